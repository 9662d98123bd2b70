/** A build that cannot go ahead: every problem found, one line each (kept light for the command line). */
export class BuildError extends Error {
  constructor(public readonly problems: string[]) {
    super(problems.join('\n'));
    this.name = 'BuildError';
  }
}
