// Local, uncommitted: the integration project with longer hook timeouts for a loaded machine.
import base from "./vitest.config";
const projects = (base.test!.projects as any[]).map((p) => (p.test.name === "integration" ? { ...p, test: { ...p.test, hookTimeout: 180_000, testTimeout: 300_000 } } : p));
export default { ...base, test: { ...base.test, projects } };
