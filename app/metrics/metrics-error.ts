/** A problem with the input of a metric, for the user: the message names the file and says what would be valid. */
export class MetricsError extends Error {
  override name = 'MetricsError';
}
