import type { ReachCurve } from "./curve";

export type CurveResponse = ReachCurve & {
  cap: number | null;
  targetEffect: number;
  /** With ?slow=1: each point's budget if enrolment takes the forecast's 80th percentile. */
  slow?: { n: number; budget: number; monthsToEnrol: number }[];
  /** Assurance at each point's n over the prior saved with the scenario; absent without one. */
  assurance?: { n: number; assurance: number }[];
  markers: { id: number; name: string; budget: number; mdes: number; effectName: string; power: number; state: string }[];
};
