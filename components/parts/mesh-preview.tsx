"use client";

import { useEffect, useRef, useState } from "react";
import * as THREE from "three";
import { STLLoader } from "three/addons/loaders/STLLoader.js";
import { OrbitControls } from "three/addons/controls/OrbitControls.js";

export type MeshPreviewProps = {
  fileId: string;
  /** Green size over finished size per axis: how much larger the printed part is drawn. */
  scale: { x: number; y: number; z: number };
  finishedLabel: string;
  greenLabel: string;
};

/**
 * The uploaded part twice, side by side on one grid: as drawn (finished) and as printed
 * (green: grown by the stock and the shrinkage factors per axis). Z is up, as on the printer.
 */
export function MeshPreview({ fileId, scale, finishedLabel, greenLabel }: MeshPreviewProps) {
  const mount = useRef<HTMLDivElement>(null);
  const [status, setStatus] = useState<"loading" | "ready" | "error">("loading");
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    const el = mount.current;
    if (!el) return;
    let disposed = false;
    let renderer: THREE.WebGLRenderer | null = null;
    let frame = 0;
    const controller = new AbortController();
    (async () => {
      try {
        const res = await fetch(`/api/files/${fileId}/content`, { signal: controller.signal });
        if (!res.ok) throw new Error(`the file could not be loaded (${res.status})`);
        const geometry = new STLLoader().parse(await res.arrayBuffer());
        if (disposed) return;
        geometry.computeBoundingBox();
        const box = geometry.boundingBox!;
        const center = box.getCenter(new THREE.Vector3());
        geometry.translate(-center.x, -center.y, -box.min.z);
        geometry.computeVertexNormals();
        const size = box.getSize(new THREE.Vector3());
        const span = Math.max(size.x * scale.x, size.y * scale.y, size.z * scale.z, 1);

        renderer = new THREE.WebGLRenderer({ antialias: true, preserveDrawingBuffer: true });
        const width = el.clientWidth;
        const height = 320;
        renderer.setPixelRatio(Math.min(window.devicePixelRatio, 2));
        renderer.setSize(width, height);
        el.appendChild(renderer.domElement);
        const scene = new THREE.Scene();
        scene.background = new THREE.Color("#f6f5f3");
        const camera = new THREE.PerspectiveCamera(35, width / height, span / 100, span * 50);
        camera.up.set(0, 0, 1);
        camera.position.set(span * 1.6, -span * 2.6, span * 1.5);
        scene.add(new THREE.HemisphereLight(0xffffff, 0x8d8273, 2.2));
        const sun = new THREE.DirectionalLight(0xffffff, 1.6);
        sun.position.set(span, -span, span * 2);
        scene.add(sun);

        const gap = span * 0.35;
        const finished = new THREE.Mesh(geometry, new THREE.MeshStandardMaterial({ color: "#8d8273", metalness: 0.4, roughness: 0.45 }));
        finished.position.x = -gap / 2 - size.x / 2;
        const green = new THREE.Mesh(geometry, new THREE.MeshStandardMaterial({ color: "#d07d4f", metalness: 0.05, roughness: 0.8 }));
        green.scale.set(scale.x, scale.y, scale.z);
        green.position.x = gap / 2 + (size.x * scale.x) / 2;
        scene.add(finished, green);
        const grid = new THREE.GridHelper(span * 4, 20, 0xb3aa9c, 0xd3cdc4);
        grid.rotation.x = Math.PI / 2;
        scene.add(grid);

        const controls = new OrbitControls(camera, renderer.domElement);
        controls.target.set(0, 0, (size.z * scale.z) / 2);
        controls.update();
        const loop = () => {
          if (disposed || !renderer) return;
          controls.update();
          renderer.render(scene, camera);
          frame = requestAnimationFrame(loop);
        };
        loop();
        setStatus("ready");
      } catch (err) {
        if ((err as Error).name === "AbortError") return;
        setStatus("error");
        setError(err instanceof Error ? err.message : String(err));
      }
    })();
    return () => {
      disposed = true;
      controller.abort();
      cancelAnimationFrame(frame);
      if (renderer) {
        renderer.dispose();
        renderer.domElement.remove();
      }
    };
  }, [fileId, scale.x, scale.y, scale.z]);

  return (
    <figure className="rounded-md border border-soot-200 bg-soot-50" data-testid="mesh-preview" data-status={status}>
      <div ref={mount} className="w-full" style={{ minHeight: 320 }} aria-label="3-D preview of the part, finished beside green" role="img" />
      <figcaption className="flex justify-between gap-2 px-3 py-2 text-2xs text-soot-600">
        <span><span className="mr-1 inline-block h-2.5 w-2.5 rounded-sm bg-soot-400 align-middle" />{finishedLabel}</span>
        <span><span className="mr-1 inline-block h-2.5 w-2.5 rounded-sm bg-clay-400 align-middle" />{greenLabel}</span>
      </figcaption>
      {status === "loading" ? <p className="px-3 pb-2 text-xs text-soot-500">Loading the mesh…</p> : null}
      {error ? <p role="alert" className="px-3 pb-2 text-xs text-oxide-700">No preview: {error}. The measurements below do not depend on it.</p> : null}
    </figure>
  );
}
