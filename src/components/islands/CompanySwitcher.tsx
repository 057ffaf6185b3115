import { useState } from 'react';
import { api } from './ui/api';

interface Props {
  current: string;
  companies: { id: string; name: string; role: string }[];
}

/** For people in several companies: pick which one you are working in. */
export default function CompanySwitcher({ current, companies }: Props) {
  const [busy, setBusy] = useState(false);
  if (companies.length < 2) {
    return <span className="font-medium text-white" data-testid="company-name">{companies.find((c) => c.id === current)?.name}</span>;
  }
  async function change(id: string) {
    setBusy(true);
    const r = await api('/api/companies/switch', { body: { organizationId: id } });
    if (r.ok) window.location.href = '/';
    else setBusy(false);
  }
  return (
    <label className="flex items-center gap-2">
      <span className="sr-only">Company</span>
      <select
        className="rounded-md border border-galv-600 bg-galv-800 px-2 py-1 text-white"
        value={current}
        disabled={busy}
        onChange={(e) => change(e.target.value)}
        data-testid="company-switcher"
      >
        {companies.map((c) => (
          <option key={c.id} value={c.id}>{c.name} ({c.role})</option>
        ))}
      </select>
    </label>
  );
}
