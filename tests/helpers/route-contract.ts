// What each route handler validates, read from its source with the TypeScript compiler: the zod
// schemas it calls .parse / .safeParse on (or hands to a shared handler as `schema`), where each
// comes from, whether it reads the body or the query, and the keys of the JSON object it answers
// with. The OpenAPI coverage test compares this with lib/api/operations.ts by object identity.
import { readFileSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { METHODS, apiRoutes, type HttpMethod } from "./routes";

export type SchemaUse = {
  /** The identifier in the route file. */
  name: string;
  /** The module it is imported from ("@/lib/parts/schemas"), or null when the route defines it. */
  from: string | null;
  /** The name it is exported under in that module. */
  exported: string;
  /** What it validates: the JSON body, the query string, or something else (rows of an uploaded CSV…). */
  input: "body" | "query" | "other";
};

export type HandlerContract = { method: HttpMethod; schemas: SchemaUse[]; answers: string[] | null };
export type RouteContract = { file: string; pattern: string; handlers: HandlerContract[] };

const ROOT = process.cwd();

function importsOf(sf: ts.SourceFile): Map<string, { from: string; exported: string }> {
  const out = new Map<string, { from: string; exported: string }>();
  for (const st of sf.statements) {
    if (!ts.isImportDeclaration(st) || !st.importClause) continue;
    const from = (st.moduleSpecifier as ts.StringLiteral).text;
    if (st.importClause.name) out.set(st.importClause.name.text, { from, exported: "default" });
    if (!st.importClause.namedBindings || !ts.isNamedImports(st.importClause.namedBindings)) continue;
    for (const el of st.importClause.namedBindings.elements) out.set(el.name.text, { from, exported: (el.propertyName ?? el.name).text });
  }
  return out;
}

/** Top-level functions and arrow constants of the file, so a handler's local helpers count as its own. */
function localFunctions(sf: ts.SourceFile): Map<string, ts.Node> {
  const out = new Map<string, ts.Node>();
  for (const st of sf.statements) {
    if (ts.isFunctionDeclaration(st) && st.name) out.set(st.name.text, st);
    if (ts.isVariableStatement(st)) {
      for (const d of st.declarationList.declarations) {
        if (ts.isIdentifier(d.name) && d.initializer && (ts.isArrowFunction(d.initializer) || ts.isFunctionExpression(d.initializer))) out.set(d.name.text, d.initializer);
      }
    }
  }
  return out;
}

function classify(arg: ts.Node | undefined, sf: ts.SourceFile): SchemaUse["input"] {
  const text = arg ? arg.getText(sf) : "";
  if (/readJson|\.json\(\)|formData/.test(text)) return "body";
  if (/searchParams|req\.url|\burl\b/.test(text)) return "query";
  return "other";
}

function scan(node: ts.Node, sf: ts.SourceFile, locals: Map<string, ts.Node>, seen: Set<ts.Node>, found: Map<string, SchemaUse["input"]>, answers: Set<string>) {
  if (seen.has(node)) return;
  seen.add(node);
  const visit = (n: ts.Node) => {
    if (ts.isCallExpression(n)) {
      const callee = n.expression;
      if (ts.isPropertyAccessExpression(callee) && ts.isIdentifier(callee.expression) && /^(parse|safeParse|parseAsync|safeParseAsync)$/.test(callee.name.text) && callee.expression.text !== "JSON") {
        found.set(callee.expression.text, classify(n.arguments[0], sf));
      }
      if (ts.isPropertyAccessExpression(callee) && callee.expression.getText(sf) === "NextResponse" && callee.name.text === "json") {
        const a = n.arguments[0];
        if (a && ts.isObjectLiteralExpression(a)) {
          for (const p of a.properties) {
            if (p.name && (ts.isIdentifier(p.name) || ts.isStringLiteral(p.name))) answers.add(p.name.text);
            else answers.add("*"); // a spread or a computed key: not a fixed shape
          }
        } else answers.add("*");
      }
      if (ts.isIdentifier(callee) && locals.has(callee.text)) scan(locals.get(callee.text)!, sf, locals, seen, found, answers);
    }
    ts.forEachChild(n, visit);
  };
  visit(node);
}

function handlerNodes(sf: ts.SourceFile): { method: HttpMethod; node: ts.Node; schemaProp?: boolean }[] {
  const out: { method: HttpMethod; node: ts.Node; schemaProp?: boolean }[] = [];
  const isMethod = (s: string): s is HttpMethod => (METHODS as string[]).includes(s);
  for (const st of sf.statements) {
    const exported = ts.canHaveModifiers(st) && ts.getModifiers(st)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword);
    if (!exported) continue;
    if (ts.isFunctionDeclaration(st) && st.name && isMethod(st.name.text)) out.push({ method: st.name.text, node: st });
    if (ts.isVariableStatement(st)) {
      for (const d of st.declarationList.declarations) {
        if (ts.isIdentifier(d.name) && isMethod(d.name.text) && d.initializer) out.push({ method: d.name.text, node: d.initializer, schemaProp: true });
        if (ts.isObjectBindingPattern(d.name) && d.initializer) {
          // export const { GET, POST } = collectionHandlers({ schema }): the schema is POST's body
          for (const el of d.name.elements) {
            const name = (el.propertyName ?? el.name).getText(sf);
            if (isMethod(name)) out.push({ method: name, node: d.initializer, schemaProp: name === "POST" || name === "PATCH" || name === "PUT" });
          }
        }
      }
    }
  }
  return out;
}

/** The `schema: X` property handed to a shared handler factory (app/_server/resource.ts). */
function schemaProperty(node: ts.Node): string | null {
  let name: string | null = null;
  const visit = (n: ts.Node) => {
    if (ts.isPropertyAssignment(n) && n.name.getText() === "schema" && ts.isIdentifier(n.initializer)) name = n.initializer.text;
    if (ts.isShorthandPropertyAssignment(n) && n.name.text === "schema") name = "schema";
    ts.forEachChild(n, visit);
  };
  visit(node);
  return name;
}

export function routeContract(file: string, pattern: string): RouteContract {
  const source = readFileSync(path.join(ROOT, file), "utf8");
  const sf = ts.createSourceFile(file, source, ts.ScriptTarget.ES2022, true, ts.ScriptKind.TS);
  const imports = importsOf(sf);
  const locals = localFunctions(sf);
  const handlers: HandlerContract[] = [];
  for (const h of handlerNodes(sf)) {
    const found = new Map<string, SchemaUse["input"]>();
    const answers = new Set<string>();
    scan(h.node, sf, locals, new Set(), found, answers);
    if (h.schemaProp) {
      const prop = schemaProperty(h.node);
      if (prop) found.set(prop, "body");
    }
    const schemas = [...found]
      .map(([name, input]) => {
        const imp = imports.get(name);
        return { name, from: imp?.from ?? null, exported: imp?.exported ?? name, input };
      })
      // a package's own parse (papaparse, …) validates nothing of ours
      .filter((u) => u.from === null || u.from.startsWith("@/") || u.from.startsWith("."));
    handlers.push({ method: h.method, schemas, answers: answers.has("*") || answers.size === 0 ? null : [...answers].sort() });
  }
  return { file, pattern, handlers };
}

export function apiContracts(): RouteContract[] {
  return apiRoutes().map((r) => routeContract(r.file, r.pattern));
}

/** The summary line above a handler: "// POST /api/orders – create an order (technician, admin)". */
export function routeSummaries(file: string): Map<string, string> {
  const out = new Map<string, string>();
  const source = readFileSync(path.join(ROOT, file), "utf8");
  for (const m of source.matchAll(/^\/\/ (GET|POST|PUT|PATCH|DELETE|HEAD) (\/api\/\S*)\s+[–-]+\s+(.*)$/gm)) out.set(m[1], m[3].trim());
  return out;
}
