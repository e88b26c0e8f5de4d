/**
 * A table that cannot be read. The message names the problem in words an uploader can act on;
 * `line` and `column` (1-based; physical lines of the file, or rows of a sheet) say where, when
 * there is one place to point at.
 */
export class TableParseError extends Error {
  override readonly name = 'TableParseError';

  constructor(
    message: string,
    readonly line?: number,
    readonly column?: number,
  ) {
    super(message);
  }
}
