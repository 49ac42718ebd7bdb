/**
 * The engine's one error type. `field` is a dot-joined path into ScenarioInput (e.g. `params.beta`,
 * `step`) so a form can put the message beside the right input; `fields` holds every failing path.
 * Plain data only, so it survives postMessage via `toJSON` / `fromJSON`.
 */
export type ModelErrorCode =
  /** ScenarioInput failed the schema (see `fields`). */
  | 'invalid_input'
  /** The fixed step is outside the method's positivity or stability bound (see `largestSafeStep`). */
  | 'unsafe_step'
  /** The adaptive integrator needed more steps than allowed, or its step fell below round-off. */
  | 'step_failure'
  /** An ensemble range or sample names an unknown path or a bad interval. */
  | 'invalid_range';

export interface ModelErrorData {
  name: 'ModelError';
  code: ModelErrorCode;
  message: string;
  field?: string;
  fields?: Record<string, string>;
  /** Days: the largest step the method accepts for this scenario (unsafe_step only). */
  largestSafeStep?: number;
}

export class ModelError extends Error {
  readonly code: ModelErrorCode;
  readonly field: string | undefined;
  readonly fields: Record<string, string> | undefined;
  readonly largestSafeStep: number | undefined;

  constructor(
    code: ModelErrorCode,
    message: string,
    opts: { field?: string; fields?: Record<string, string>; largestSafeStep?: number } = {},
  ) {
    super(message);
    this.name = 'ModelError';
    this.code = code;
    this.field = opts.field;
    this.fields = opts.fields ?? (opts.field ? { [opts.field]: message } : undefined);
    this.largestSafeStep = opts.largestSafeStep;
  }

  toJSON(): ModelErrorData {
    const out: ModelErrorData = { name: 'ModelError', code: this.code, message: this.message };
    if (this.field !== undefined) out.field = this.field;
    if (this.fields !== undefined) out.fields = this.fields;
    if (this.largestSafeStep !== undefined) out.largestSafeStep = this.largestSafeStep;
    return out;
  }

  static fromJSON(d: ModelErrorData): ModelError {
    const opts: { field?: string; fields?: Record<string, string>; largestSafeStep?: number } = {};
    if (d.field !== undefined) opts.field = d.field;
    if (d.fields !== undefined) opts.fields = d.fields;
    if (d.largestSafeStep !== undefined) opts.largestSafeStep = d.largestSafeStep;
    return new ModelError(d.code, d.message, opts);
  }

  static isData(v: unknown): v is ModelErrorData {
    return typeof v === 'object' && v !== null && (v as { name?: unknown }).name === 'ModelError';
  }
}
