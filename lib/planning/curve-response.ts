import type { ReachCurve } from "./curve";

export type CurveResponse = ReachCurve & {
  cap: number | null;
  targetEffect: number;
  /** Assurance at each point's n over the prior saved with the scenario; absent without one. */
  assurance?: { n: number; assurance: number }[];
  markers: { id: number; name: string; budget: number; mdes: number; effectName: string; power: number; state: string }[];
};
