import { solve, solveParsed } from "../lib/power";
import { fastParse } from "../lib/power/fast-parse";
import { twoMeansPower } from "../lib/power/designs/means";
function cpu(fn: (i: number) => unknown, n = 2000, b = 25) { for (let i = 0; i < n; i++) fn(i); const a: number[] = []; for (let k = 0; k < b; k++) { const t = process.cpuUsage(); for (let i = 0; i < n; i++) fn(i); const d = process.cpuUsage(t); a.push((d.user + d.system) / n); } a.sort((x, y) => x - y); return a[b >> 2]!; }
const varied = Array.from({ length: 500 }, (_, i) => ({ design: "two-means" as const, effectSize: 0.15 + (i % 37) / 40, n1: 10 + ((i * 7) % 301), alpha: [0.05, 0.01, 0.025][i % 3]!, sides: (i % 2 ? 1 : 2) as 1 | 2 }));
const parsed = varied.map((v) => fastParse(v)!);
const ev = (i: number) => { const x = varied[i % 500]!; return twoMeansPower(x.effectSize, x.n1, x.n1, { alpha: x.alpha, sides: x.sides, allocationRatio: 1 }); };
for (let r = 0; r < 3; r++) {
  const e = cpu(ev), p = cpu((i) => solve(varied[i % 500]!)), sp = cpu((i) => solveParsed(parsed[i % 500]!)), fp = cpu((i) => fastParse(varied[i % 500]!));
  console.log(`eval ${e.toFixed(2)} public ${p.toFixed(2)} ratio ${(p / e).toFixed(2)} solveParsed ${sp.toFixed(2)} fastParse ${fp.toFixed(2)}`);
}
