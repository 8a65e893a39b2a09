/**
 * Worker-thread entry for the analysis pool (piscina calls the default export once per task).
 * Errors come back as data, because an Error's own fields do not survive the thread boundary.
 */
import type { MessagePort } from 'node:worker_threads';
import { AudioAnalysisError } from './errors.ts';
import { measureFileSegment } from './read-segment.ts';
import { SegmentAnalyzer, type SegmentPlan, type SegmentResult } from './segment-analyzer.ts';

export interface FileSegmentTask {
  kind: 'file-segment';
  path: string;
  plan: SegmentPlan;
  /** Receives `{ bytes }` progress messages. */
  progressPort: MessagePort;
}

/**
 * Audio bytes arrive on `dataPort` as `{ bytes: ArrayBuffer }` messages and end with
 * `{ end: true }`; each one is acknowledged with `'ack'` so the sender can hold back.
 */
export interface PortStreamTask {
  kind: 'port-stream';
  plan: SegmentPlan;
  dataPort: MessagePort;
}

export type AnalysisTask = FileSegmentTask | PortStreamTask;

export type AnalysisTaskResult =
  | { ok: true; segment: SegmentResult }
  | { ok: false; error: { code: string; message: string; format?: string } };

function toFailure(error: unknown): AnalysisTaskResult {
  if (error instanceof AudioAnalysisError) return { ok: false, error: error.toJSON() };
  const message = error instanceof Error ? error.message : String(error);
  return { ok: false, error: { code: 'read-failed', message: `The analysis failed: ${message}` } };
}

function runFileSegment(task: FileSegmentTask): AnalysisTaskResult {
  try {
    const segment = measureFileSegment(task.path, task.plan, {
      onBytes: (bytes) => task.progressPort.postMessage({ bytes }),
    });
    return { ok: true, segment };
  } catch (error) {
    return toFailure(error);
  } finally {
    task.progressPort.close();
  }
}

function runPortStream(task: PortStreamTask): Promise<AnalysisTaskResult> {
  const analyzer = new SegmentAnalyzer(task.plan);
  return new Promise((resolve) => {
    const finish = (result: AnalysisTaskResult): void => {
      task.dataPort.close();
      resolve(result);
    };
    task.dataPort.on('message', (message: { bytes?: ArrayBuffer; end?: boolean }) => {
      try {
        if (message.bytes) {
          analyzer.push(new Uint8Array(message.bytes));
          task.dataPort.postMessage('ack');
        }
        if (message.end) finish({ ok: true, segment: analyzer.finish() });
      } catch (error) {
        finish(toFailure(error));
      }
    });
  });
}

export default function analyzeTask(
  task: AnalysisTask,
): AnalysisTaskResult | Promise<AnalysisTaskResult> {
  return task.kind === 'file-segment' ? runFileSegment(task) : runPortStream(task);
}
