import type { AudioFileVersion } from '@/lib/api/schemas';

/** Analysis state in words with a shape (never colour alone), progress while it runs. */
export function AnalysisStateText({ file }: { file: AudioFileVersion }) {
  switch (file.analysisState) {
    case 'pending':
      return <span className="text-slate">○ Waiting to analyse</span>;
    case 'running':
      return (
        <span className="figures text-slate">
          ◐ Analysing
          {file.analysisProgress !== null && ` ${Math.round(file.analysisProgress * 100)} %`}
        </span>
      );
    case 'done':
      return <span className="text-pass">● Analysed</span>;
    case 'failed':
      return (
        <span className="text-fail">
          ■ Analysis failed: {file.analysisError ?? 'no reason recorded.'}
        </span>
      );
  }
}
