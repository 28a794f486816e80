/** What a command may use of the process: output streams, TTY colour, the current date. */
export interface Io {
  readonly out: (s: string) => void;
  readonly err: (s: string) => void;
  /**
   * Resolves once standard output has taken what was written so far (a pipe to a slower reader
   * holds writes in memory until then); absent where output is taken at once (tests).
   */
  readonly drained?: () => Promise<void>;
  /** Colour allowed (stdout is a TTY and NO_COLOR is not set). */
  readonly isTty: boolean;
  /** "Today" for waiver expiry; passed in so that tests are deterministic. */
  readonly now: Date;
}
