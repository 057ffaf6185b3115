import { useState, type SubmitEvent } from 'react';
import { companyInput } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

export default function CreateCompanyForm() {
  const [name, setName] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(companyInput, { name });
    if (!v.ok) return setFields(v.fields);
    const r = await api('/api/companies', { body: v.data });
    if (r.ok) window.location.href = '/';
    else setError(r.error.message);
  }
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormError message={error} />
      <Field id="name" label="Company name" error={fields.name}>
        {(p) => <input {...p} value={name} onChange={(e) => setName(e.target.value)} />}
      </Field>
      <button className="btn-primary w-full" type="submit">Create the company</button>
    </form>
  );
}
