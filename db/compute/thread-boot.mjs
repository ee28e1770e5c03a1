// A compute thread starts here: Node 20 does not apply a loader given in a worker's execArgv to
// the worker's own entry, so the thread registers tsx itself and then loads the TypeScript body.
import { register } from "tsx/esm/api";

register();
await import("./thread-entry.ts");
