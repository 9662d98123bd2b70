/**
 * The one error every source reader throws for bad input: a single line that starts with the
 * file (or folder) and says what is wrong and, where it helps, what would be valid.
 */
export class SourceError extends Error {
  constructor(
    public readonly path: string,
    public readonly detail: string,
  ) {
    super(`${path}: ${detail}`);
    this.name = 'SourceError';
  }
}

/** dicom-parser and zlib throw strings and plain objects too; this gives one line of text. */
export function describeThrown(e: unknown): string {
  if (e instanceof Error) return e.message;
  if (typeof e === 'string') return e;
  if (e && typeof e === 'object' && 'exception' in e) return describeThrown((e as { exception: unknown }).exception);
  return String(e);
}
