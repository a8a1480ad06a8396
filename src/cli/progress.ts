/**
 * Progress display for long builds (src/cli/commands/build.ts): on a TTY one line redrawn in place
 * ("charts  [#######.....]  412/1000"), throttled to ~10 redraws a second; elsewhere nothing per
 * step (a log stays clean), only the phase names as they start when `phases` is set.
 *
 *   const p = createProgress(process.stderr);
 *   buildSite(results, dir, { onProgress: p.onProgress });  ... p.done();
 */
export interface ProgressStream {
  write(text: string): unknown;
  isTTY?: boolean;
  columns?: number;
}

export interface Progress {
  onProgress(phase: string, done: number, total: number): void;
  /** Finish the line (call once at the end, also after errors). */
  done(): void;
}

export interface ProgressOptions {
  /** Print each phase name once when it starts on a non-TTY stream (default false: print nothing). */
  phases?: boolean;
  /** Clock for throttling (ms), injectable for tests. */
  now?: () => number;
}

/** Bar text for one state. Example: progressLine('charts', 5, 10, 10) → 'charts  [#####.....]  5/10'. */
export function progressLine(phase: string, done: number, total: number, width = 24): string {
  const frac = total > 0 ? Math.min(1, Math.max(0, done / total)) : 0;
  const fill = Math.round(frac * width);
  return `${phase}  [${'#'.repeat(fill)}${'.'.repeat(width - fill)}]  ${done}/${total}`;
}

export function createProgress(stream: ProgressStream, options: ProgressOptions = {}): Progress {
  const now = options.now ?? (() => Date.now());
  let lastPhase = '';
  let lastDraw = -Infinity;
  let drawn = false;
  return {
    onProgress(phase, done, total) {
      if (!stream.isTTY) {
        if (options.phases && phase !== lastPhase) stream.write(`${phase}\n`);
        lastPhase = phase;
        return;
      }
      const t = now();
      const changed = phase !== lastPhase;
      if (!changed && done < total && t - lastDraw < 100) return;
      lastPhase = phase;
      lastDraw = t;
      const width = Math.max(10, Math.min(40, (stream.columns ?? 80) - phase.length - 20));
      stream.write(`\r\x1b[2K${progressLine(phase, done, total, width)}`);
      drawn = true;
    },
    done() {
      if (drawn) stream.write('\r\x1b[2K');
      drawn = false;
    },
  };
}
