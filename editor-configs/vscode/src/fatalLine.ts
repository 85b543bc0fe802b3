// The server reports a fatal start-up problem (missing model, bad config) as
// one stderr line starting with "calami: " and then exits. We keep the last
// such line so the editor can show it instead of a generic "server crashed".

const PREFIX = "calami: ";

/** Collects stderr text, which may arrive split at any byte, line by line. */
export class FatalLineCollector {
  private partial = "";
  private last: string | undefined;

  push(chunk: string): void {
    const lines = (this.partial + chunk).split(/\r?\n/);
    this.partial = lines.pop() ?? "";
    for (const line of lines) {
      this.consider(line);
    }
  }

  /** The last "calami: ..." line seen, counting an unterminated final line. */
  lastFatalLine(): string | undefined {
    const pending = this.partial.trim();
    return pending.startsWith(PREFIX) ? pending : this.last;
  }

  private consider(line: string): void {
    const trimmed = line.trim();
    if (trimmed.startsWith(PREFIX)) {
      this.last = trimmed;
    }
  }
}
