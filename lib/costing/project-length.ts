/** The project's length: the study's months (start-up to close-out) should fit within the period the sponsor funds. Common practice. */
export type ProjectLengthCheck = { projectMonths: number; studyMonths: number; within: boolean };

export function projectLengthCheck(projectMonths: number | null | undefined, studyMonths: number): ProjectLengthCheck | null {
  if (!projectMonths) return null;
  return { projectMonths, studyMonths, within: studyMonths <= projectMonths };
}
