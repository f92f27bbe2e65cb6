/** Typed engine errors: the `code` is stable for programs, the message names the problem for people. */
export type EngineErrorCode =
  | 'unsupported_format'
  | 'corrupt_file'
  | 'truncated_file'
  | 'too_large'
  | 'invalid_frame'
  | 'invalid_input'
  | 'invalid_profile'
  | 'no_signal'
  | 'no_peaks'
  | 'fit_failed'
  | 'ill_conditioned';

export class EngineError extends Error {
  readonly code: EngineErrorCode;
  readonly details?: Record<string, unknown>;
  constructor(code: EngineErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = 'EngineError';
    this.code = code;
    this.details = details;
  }
}
