/**
 * A progress line on standard error, only when it is a terminal: points done, rate and time
 * left. Silent when standard error is piped or redirected.
 */

export interface ProgressStream {
  isTTY?: boolean;
  columns?: number;
  write(s: string): boolean;
}

const REDRAW_MS = 100;

export class Progress {
  private done = 0;
  private readonly t0 = Date.now();
  private last = 0;
  private readonly enabled: boolean;

  constructor(
    private readonly total: number,
    /** Points already in the file (resume): not counted in the rate. */
    private readonly already = 0,
    private readonly stream: ProgressStream = process.stderr,
  ) {
    this.enabled = stream.isTTY === true && total > 0;
    this.done = already;
  }

  tick(n = 1): void {
    this.done += n;
    if (!this.enabled) return;
    const now = Date.now();
    if (now - this.last < REDRAW_MS && this.done < this.total) return;
    this.last = now;
    this.stream.write(`\r${progressLine(this.done, this.total, this.done - this.already, (now - this.t0) / 1000, this.stream.columns || 80)}\x1b[K`);
  }

  /** Clears the line. */
  finish(): void {
    if (this.enabled) this.stream.write('\r\x1b[K');
  }
}

/** `[#####-----]  412/1000  41 %  230 points/s  0:03 left` */
export function progressLine(done: number, total: number, solvedHere: number, seconds: number, columns: number): string {
  const rate = seconds > 0 ? solvedHere / seconds : 0;
  const left = rate > 0 ? (total - done) / rate : Number.NaN;
  const pct = Math.floor((100 * done) / total);
  const tail = `  ${done}/${total}  ${pct} %  ${rate >= 10 ? Math.round(rate) : rate.toFixed(1)} points/s  ${Number.isFinite(left) ? `${clock(left)} left` : ''}`;
  const width = Math.max(10, Math.min(40, columns - tail.length - 4));
  const fill = Math.round((width * done) / total);
  return `[${'#'.repeat(fill)}${'-'.repeat(width - fill)}]${tail}`.slice(0, Math.max(20, columns - 1));
}

function clock(s: number): string {
  const t = Math.ceil(s);
  const h = Math.floor(t / 3600);
  const m = Math.floor((t % 3600) / 60);
  const sec = t % 60;
  const mm = String(m).padStart(h ? 2 : 1, '0');
  return `${h ? `${h}:` : ''}${mm}:${String(sec).padStart(2, '0')}`;
}
