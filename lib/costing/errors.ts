/** A costing input the engine cannot price, with the scenario field it is about where there is one. */
export class CostingError extends Error {
  readonly code = "costing";
  /** The scenario input the message is about, where one is (as the API names it: "inputs.visits.0.procedures"). */
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}
