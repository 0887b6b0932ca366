/**
 * Pilot-study SD: plan with its upper one-sided confidence limit, s·sqrt(df / χ²(1 − c; df)),
 * Browne (1995), Statistics in Medicine 14, 1933–1940; 80% by default, df = pilot n − 1.
 */
import { chiSquareQuantile } from "./special";

export function pilotSdUpperLimit(sd: number, n: number, confidence = 0.8): { upperLimit: number; inflation: number } {
  const df = n - 1;
  const inflation = Math.sqrt(df / chiSquareQuantile(1 - confidence, df));
  return { upperLimit: sd * inflation, inflation };
}
