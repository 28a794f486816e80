/** What a command may use of the process: output streams, TTY colour, the current date. */
export interface Io {
  readonly out: (s: string) => void;
  readonly err: (s: string) => void;
  /** Colour allowed (stdout is a TTY and NO_COLOR is not set). */
  readonly isTty: boolean;
  /** "Today" for waiver expiry; passed in so that tests are deterministic. */
  readonly now: Date;
}
