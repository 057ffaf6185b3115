export default function SignOutButton() {
  async function signOut() {
    await fetch('/api/auth/sign-out', { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' });
    window.location.href = '/sign-in';
  }
  return (
    <button type="button" onClick={signOut} className="rounded-md border border-galv-600 px-2 py-1 text-galv-100 hover:bg-galv-800">
      Sign out
    </button>
  );
}
