/**
 * Progress lines on stderr (stdout carries results only, so output pipes cleanly).
 * On a terminal the line is rewritten in place; elsewhere one line per update, throttled.
 */
export class Progress {
  private last = 0;
  private readonly tty = Boolean(process.stderr.isTTY);
  constructor(
    private readonly label: string,
    private readonly quiet = false,
    private readonly minIntervalMs = 1000,
  ) {}

  update(text: string, force = false): void {
    if (this.quiet) return;
    const now = Date.now();
    if (!force && now - this.last < (this.tty ? 100 : this.minIntervalMs)) return;
    this.last = now;
    if (this.tty) process.stderr.write(`\r\x1b[K${this.label}: ${text}`);
    else process.stderr.write(`${this.label}: ${text}\n`);
  }

  done(text: string): void {
    if (this.quiet) return;
    if (this.tty) process.stderr.write(`\r\x1b[K${this.label}: ${text}\n`);
    else process.stderr.write(`${this.label}: ${text}\n`);
  }
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '?';
  if (seconds < 60) return `${seconds.toFixed(1)} s`;
  const m = Math.floor(seconds / 60);
  return `${m} min ${Math.round(seconds - 60 * m)} s`;
}
