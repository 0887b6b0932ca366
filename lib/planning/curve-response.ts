import type { ReachCurve } from "./curve";

export type CurveResponse = ReachCurve & {
  cap: number | null;
  targetEffect: number;
  markers: { id: number; name: string; budget: number; mdes: number; power: number; state: string }[];
};
