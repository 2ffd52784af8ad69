/**
 * The one error type the engine raises for bad input. `field` names what is wrong in the caller's terms:
 * a matrix (`A`, `B`, `C`, `D`, `mass`, …), a file name, or an option (`order`, `tolerance`, `ts`, …),
 * so the web layer can show the message beside the form field it concerns and answer 4xx.
 */
export type ModelErrorCode =
  | 'parse_error'
  | 'not_square'
  | 'dimension_mismatch'
  | 'non_finite'
  | 'non_numeric'
  | 'empty_matrix'
  | 'singular_mass'
  | 'invalid_option'
  | 'order_too_large'
  | 'unsupported_format'
  | 'unstable'
  | 'truncated_file'
  | 'jagged_rows'
  | 'unsorted_times'
  | 'unreadable_file'
  | 'missing_field'
  | 'unknown_field'
  | 'too_large';

export class ModelError extends Error {
  readonly code: ModelErrorCode;
  readonly field: string;

  constructor(code: ModelErrorCode, field: string, message: string) {
    super(message);
    this.name = 'ModelError';
    this.code = code;
    this.field = field;
  }

  toJSON(): { code: ModelErrorCode; message: string; field: string } {
    return { code: this.code, message: this.message, field: this.field };
  }
}
