/** Every way an analysis can fail, as a stable code the server can map to a message or status. */
export type AudioErrorCode =
  | 'empty-file'
  | 'not-audio'
  | 'unsupported-format'
  | 'bad-header'
  | 'truncated'
  | 'zero-channels'
  | 'absurd-sample-rate'
  | 'unsupported-bit-depth'
  | 'no-audio-data'
  | 'read-failed'
  | 'cancelled';

/**
 * A failure the user can act on: `code` is stable, `message` is plain English suitable for an
 * engineer, `format` names the container when it was recognised (e.g. 'flac').
 */
export class AudioAnalysisError extends Error {
  readonly code: AudioErrorCode;
  readonly format: string | undefined;

  constructor(code: AudioErrorCode, message: string, format?: string) {
    super(message);
    this.name = 'AudioAnalysisError';
    this.code = code;
    this.format = format;
  }

  toJSON(): { code: AudioErrorCode; message: string; format?: string } {
    return this.format === undefined
      ? { code: this.code, message: this.message }
      : { code: this.code, message: this.message, format: this.format };
  }
}

export function isAudioAnalysisError(error: unknown): error is AudioAnalysisError {
  return error instanceof AudioAnalysisError;
}

/** Rebuilds an AudioAnalysisError from its JSON form (worker → main thread). */
export function reviveAudioAnalysisError(value: unknown): AudioAnalysisError | null {
  if (typeof value !== 'object' || value === null) return null;
  const record = value as Record<string, unknown>;
  if (typeof record.code !== 'string' || typeof record.message !== 'string') return null;
  const format = typeof record.format === 'string' ? record.format : undefined;
  return new AudioAnalysisError(record.code as AudioErrorCode, record.message, format);
}
