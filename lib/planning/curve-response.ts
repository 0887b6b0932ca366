import type { ReachCurve } from "./curve";

export type CurveResponse = ReachCurve & {
  cap: number | null;
  targetEffect: number;
  markers: { id: number; name: string; budget: number; mdes: number; effectName: string; power: number; state: string }[];
};
