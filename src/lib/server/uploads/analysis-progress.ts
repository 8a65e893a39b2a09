/**
 * How far each running analysis has read, kept in memory (the browser polls it), with a tag
 * that changes whenever what a user would see changes: a tenth of a percent, an analysis
 * starting or ending. Cached answers that show progress are keyed by that tag.
 */
export interface Progress {
  bytesDone: number;
  bytesTotal: number;
}

export interface ProgressBoard {
  set(audioFileId: string, progress: Progress): void;
  delete(audioFileId: string): void;
  has(audioFileId: string): boolean;
  /** Fraction 0…1 of an analysis under way, or null. */
  fraction(audioFileId: string): number | null;
  tag(): string;
}

/** Progress as shown: in tenths of a percent, -1 before the size is known. */
function shown(progress: Progress | undefined): number {
  return progress && progress.bytesTotal > 0
    ? Math.floor((1000 * progress.bytesDone) / progress.bytesTotal)
    : -1;
}

export function createProgressBoard(): ProgressBoard {
  const byId = new Map<string, Progress>();
  let version = 0;
  return {
    set(audioFileId, progress) {
      if (!byId.has(audioFileId) || shown(byId.get(audioFileId)) !== shown(progress)) version += 1;
      byId.set(audioFileId, progress);
    },
    delete(audioFileId) {
      if (byId.delete(audioFileId)) version += 1;
    },
    has: (audioFileId) => byId.has(audioFileId),
    fraction(audioFileId) {
      const progress = byId.get(audioFileId);
      if (!progress) return null;
      return progress.bytesTotal > 0 ? Math.min(1, progress.bytesDone / progress.bytesTotal) : 0;
    },
    tag: () => `analysis:${version}`,
  };
}
