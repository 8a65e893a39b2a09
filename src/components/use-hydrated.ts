import { useEffect, useState } from 'react';

/**
 * False in the server-rendered HTML, true once React has hydrated. Submit buttons stay
 * disabled until then, so an early click cannot fall back to a native GET submission that
 * would put form fields (a password) in the URL.
 */
export function useHydrated(): boolean {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}
