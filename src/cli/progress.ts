/**
 * Progress lines on stderr (stdout carries results only, so output pipes cleanly).
 * On a terminal the line is rewritten in place; elsewhere one line per update, throttled.
 */
export class Progress {
  private last = 0;
  private readonly started = performance.now();
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

  /**
   * One unit of work of a run whose size is known (or, with `estimated`, expected): the count,
   * what it reached (loss, residual, χN), the rate since the run started and the time left for
   * the whole run. An estimated total is shown with "~" and grows when the work runs past it.
   */
  step(done: number, total: number, detail: string, unit = 'steps', estimated = false): void {
    const seconds = (performance.now() - this.started) / 1000;
    const rate = seconds > 0 ? done / seconds : Number.NaN;
    const size = estimated ? Math.max(total, done + 1) : total;
    const left = rate > 0 ? (size - done) / rate : Number.NaN;
    const tilde = estimated ? '~' : '';
    this.update(`${unit} ${done}/${tilde}${size}${detail ? ` | ${detail}` : ''} | ${formatRate(rate)} ${unit}/s | ${tilde}${formatDuration(left)} left`);
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

function formatRate(rate: number): string {
  if (!Number.isFinite(rate)) return '?';
  return rate >= 10 ? rate.toFixed(0) : rate >= 1 ? rate.toFixed(1) : rate.toPrecision(2);
}
