/** The demo sign-ins are listed unless this is a production install that switched the demo off. */
export function showDemoSignIns(env: Record<string, string | undefined> = process.env): boolean {
  return !(env.NODE_ENV === "production" && env.HEARTH_DEMO === "0");
}
