import { useState } from 'react';

export default function SignOutButton() {
  const [busy, setBusy] = useState(false);
  async function signOut() {
    setBusy(true);
    try {
      await fetch('/api/auth/sign-out', {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: '{}',
      });
    } finally {
      window.location.assign('/sign-in');
    }
  }
  return (
    <button
      type="button"
      onClick={signOut}
      disabled={busy}
      className="rounded border border-slate px-3 py-1.5 text-sm hover:bg-ink-soft disabled:opacity-60"
    >
      {busy ? 'Signing out…' : 'Sign out'}
    </button>
  );
}
