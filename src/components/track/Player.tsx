import { forwardRef, useCallback, useEffect, useImperativeHandle, useRef, useState } from 'react';

const CAUTION_KEY = 'quayside.listening-caution-accepted';

export interface PlayerHandle {
  /** Plays from `seconds`, after the listening-level caution if not yet accepted. */
  playFrom(seconds: number): void;
}

function cautionAccepted(): boolean {
  try {
    return window.sessionStorage.getItem(CAUTION_KEY) === 'yes';
  } catch {
    return false;
  }
}

/**
 * The player: an `<audio>` element fed by the Range proxy. Before the first playback in a
 * browser session it shows the listening-level caution instead of the controls.
 */
export const Player = forwardRef<
  PlayerHandle,
  { audioFileId: string; onTime: (seconds: number) => void }
>(function Player({ audioFileId, onTime }, ref) {
  const audio = useRef<HTMLAudioElement>(null);
  const cautionBox = useRef<HTMLDivElement>(null);
  const [accepted, setAccepted] = useState(false);
  const [pendingSeconds, setPendingSeconds] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => setAccepted(cautionAccepted()), []);

  const play = useCallback((seconds: number) => {
    const element = audio.current;
    if (!element) return;
    element.currentTime = seconds;
    element.play().catch((reason: unknown) => {
      if (reason instanceof DOMException && reason.name === 'AbortError') return;
      setError('The browser could not play this file.');
    });
  }, []);

  useImperativeHandle(
    ref,
    () => ({
      playFrom(seconds: number) {
        if (accepted) play(seconds);
        else {
          setPendingSeconds(seconds);
          cautionBox.current?.focus();
        }
      },
    }),
    [accepted, play],
  );

  useEffect(() => {
    if (accepted && pendingSeconds !== null && audio.current) {
      const seconds = pendingSeconds;
      setPendingSeconds(null);
      play(seconds);
    }
  }, [accepted, pendingSeconds, play]);

  return (
    <div>
      {!accepted && (
        <div
          ref={cautionBox}
          tabIndex={-1}
          role="alertdialog"
          aria-labelledby="listening-caution-title"
          className="rounded border border-warn/50 bg-sand p-4"
          data-testid="listening-caution"
        >
          <p id="listening-caution-title" className="font-medium">
            ▲ Listening level
          </p>
          <p className="mt-1 text-sm">
            Masters are loud, and a file with a fault can be louder still: a click, an over or
            full-scale noise. Turn your monitors or headphones down before you play, then bring the
            level up.
          </p>
          <button
            type="button"
            className="mt-3 rounded bg-ink px-3 py-1.5 text-sm font-medium text-white"
            onClick={() => {
              try {
                window.sessionStorage.setItem(CAUTION_KEY, 'yes');
              } catch {
                // Private mode: the caution shows again next time, which is harmless.
              }
              setAccepted(true);
            }}
          >
            I have turned the level down
          </button>
          {pendingSeconds !== null && (
            <p className="mt-2 text-sm text-slate">Playback starts once you confirm.</p>
          )}
        </div>
      )}
      {/* biome-ignore lint/a11y/useMediaCaption: a master has no words to caption */}
      <audio
        ref={audio}
        controls={accepted}
        hidden={!accepted}
        preload="none"
        data-testid="player"
        src={`/api/audio/${encodeURIComponent(audioFileId)}/stream`}
        onTimeUpdate={(event) => onTime(event.currentTarget.currentTime)}
        onSeeked={(event) => onTime(event.currentTarget.currentTime)}
        className="w-full"
      />
      {error && (
        <p role="alert" className="mt-2 text-sm text-fail">
          {error}
        </p>
      )}
    </div>
  );
});
