/** A request the analysis library cannot compute, with a message that says what to change. */
export class AnalysisError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AnalysisError';
  }
}
