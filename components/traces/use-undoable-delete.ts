/**
 * Delete with a grace period: the API's DELETE /api/traces/:id has no restore,
 * so the request is only sent after `graceMs` (or when the screen closes), and
 * Undo within that time simply cancels it.
 */
import { useCallback, useEffect, useRef, useState } from "react";

export function useUndoableDelete(commit: () => void, graceMs = 8000) {
  const [pending, setPending] = useState(false);
  const [secondsLeft, setSecondsLeft] = useState(0);
  const commitRef = useRef(commit);
  commitRef.current = commit;
  const pendingRef = useRef(false);

  useEffect(() => {
    if (!pending) return;
    const started = Date.now();
    const tick = setInterval(() => setSecondsLeft(Math.max(0, Math.ceil((graceMs - (Date.now() - started)) / 1000))), 250);
    const done = setTimeout(() => {
      pendingRef.current = false;
      setPending(false);
      commitRef.current();
    }, graceMs);
    return () => {
      clearInterval(tick);
      clearTimeout(done);
    };
  }, [pending, graceMs]);

  // Leaving the screen while a delete is pending carries it out.
  useEffect(() => () => {
    if (pendingRef.current) commitRef.current();
  }, []);

  const start = useCallback(() => {
    pendingRef.current = true;
    setSecondsLeft(Math.ceil(graceMs / 1000));
    setPending(true);
  }, [graceMs]);
  const undo = useCallback(() => {
    pendingRef.current = false;
    setPending(false);
  }, []);
  return { pending, secondsLeft, start, undo };
}
