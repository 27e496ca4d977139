'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { MarkerSwatch } from '@/components/scoring/marker-swatch';
import type { StoredClassSet } from '@/db/queries/class-sets';
import { apiFetch, ApiRequestError } from '@/lib/api/fetcher';
import { CLASS_GROUPS, MARKER_SHAPES, type MarkClass } from '@/lib/class-sets/schema';

type Draft = { id?: number; name: string; isDefault: boolean; classes: MarkClass[] };

export function ClassSetEditor({ sets }: { sets: StoredClassSet[] }) {
  const router = useRouter();
  const [selected, setSelected] = useState<number | 'new'>(sets.find((s) => s.isDefault)?.id ?? sets[0]?.id ?? 'new');
  const source = selected === 'new' ? null : sets.find((s) => s.id === selected)!;
  const [draft, setDraft] = useState<Draft>(source ? { id: source.id, name: source.name, isDefault: source.isDefault, classes: source.classes } : { name: '', isDefault: false, classes: [] });
  const [errors, setErrors] = useState<{ path: string; message: string }[]>([]);
  const [status, setStatus] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);

  function pick(id: number | 'new') {
    setSelected(id);
    setErrors([]);
    setStatus(null);
    const s = id === 'new' ? null : sets.find((x) => x.id === id)!;
    const base = sets.find((x) => x.isDefault) ?? sets[0];
    setDraft(s ? { id: s.id, name: s.name, isDefault: s.isDefault, classes: s.classes } : { name: `${base?.name ?? 'New'} (copy)`, isDefault: false, classes: base?.classes ?? [] });
  }
  const setClass = (i: number, patch: Partial<MarkClass>) => setDraft((d) => ({ ...d, classes: d.classes.map((c, j) => (j === i ? { ...c, ...patch } : c)) }));
  const move = (i: number, by: number) =>
    setDraft((d) => {
      const classes = [...d.classes];
      const [c] = classes.splice(i, 1);
      classes.splice(i + by, 0, c);
      return { ...d, classes };
    });
  const errorFor = (i: number, field: string) => errors.find((e) => e.path === `classes.${i}.${field}`)?.message;

  async function save() {
    setErrors([]);
    setStatus(null);
    try {
      const body = JSON.stringify({ name: draft.name, classes: draft.classes, ...(draft.id ? { isDefault: draft.isDefault } : {}) });
      await apiFetch(draft.id ? `/api/class-sets/${draft.id}` : '/api/class-sets', { method: draft.id ? 'PUT' : 'POST', body });
      setStatus({ kind: 'ok', text: `“${draft.name}” saved. Reads started from now on use it.` });
      router.refresh();
    } catch (err) {
      if (err instanceof ApiRequestError) setErrors(err.body.issues ?? []);
      setStatus({ kind: 'error', text: err instanceof Error ? err.message : 'Saving failed.' });
    }
  }

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="set-pick" className="label">Class set</label>
          <select id="set-pick" className="input" value={selected} onChange={(e) => pick(e.target.value === 'new' ? 'new' : Number(e.target.value))}>
            {sets.map((s) => <option key={s.id} value={s.id}>{s.name}{s.isDefault ? ' (default)' : ''} — used by {s.reads} read(s)</option>)}
            <option value="new">New set (copy of the default)…</option>
          </select>
        </div>
        <div>
          <label htmlFor="set-name" className="label">Name</label>
          <input id="set-name" className="input" value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} />
        </div>
        {draft.id && (
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={draft.isDefault} onChange={(e) => setDraft({ ...draft, isDefault: e.target.checked })} /> Default for new reads
          </label>
        )}
      </div>
      <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Classes">
          <thead>
            <tr>
              <th className="th">Marker</th><th className="th">Name</th><th className="th">Key</th><th className="th">Group</th><th className="th">Colour</th><th className="th">Shape</th><th className="th"><span className="sr-only">Order</span></th>
            </tr>
          </thead>
          <tbody>
            {draft.classes.map((c, i) => (
              <tr key={c.key}>
                <td className="td"><MarkerSwatch shape={c.shape} colour={c.colour} size={22} /></td>
                <td className="td">
                  <input aria-label={`Name of class ${i + 1}`} className="input" value={c.name} onChange={(e) => setClass(i, { name: e.target.value })} />
                  {errorFor(i, 'name') && <p className="field-error">{errorFor(i, 'name')}</p>}
                </td>
                <td className="td">
                  <input aria-label={`Key of ${c.name}`} className="input w-14" maxLength={1} value={c.hotkey ?? ''} onChange={(e) => setClass(i, { hotkey: e.target.value || null })} />
                  {errorFor(i, 'hotkey') && <p className="field-error">{errorFor(i, 'hotkey')}</p>}
                </td>
                <td className="td">
                  <select aria-label={`Group of ${c.name}`} className="input" value={c.group} onChange={(e) => setClass(i, { group: e.target.value as MarkClass['group'], countsAsSperm: e.target.value !== 'non_sperm' })}>
                    {CLASS_GROUPS.map((g) => <option key={g} value={g}>{g.replace('_', '-')}</option>)}
                  </select>
                </td>
                <td className="td"><input type="color" aria-label={`Colour of ${c.name}`} value={c.colour} onChange={(e) => setClass(i, { colour: e.target.value.toUpperCase() })} /></td>
                <td className="td">
                  <select aria-label={`Shape of ${c.name}`} className="input" value={c.shape} onChange={(e) => setClass(i, { shape: e.target.value as MarkClass['shape'] })}>
                    {MARKER_SHAPES.map((s) => <option key={s}>{s}</option>)}
                  </select>
                  {errorFor(i, 'shape') && <p className="field-error">{errorFor(i, 'shape')}</p>}
                </td>
                <td className="td whitespace-nowrap">
                  <button type="button" className="btn-secondary px-2 py-1" disabled={i === 0} onClick={() => move(i, -1)} aria-label={`Move ${c.name} up`}>↑</button>{' '}
                  <button type="button" className="btn-secondary px-2 py-1" disabled={i === draft.classes.length - 1} onClick={() => move(i, 1)} aria-label={`Move ${c.name} down`}>↓</button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <button
        type="button"
        className="btn-secondary"
        onClick={() => setDraft((d) => ({ ...d, classes: [...d.classes, { key: `class_${d.classes.length + 1}_${Date.now() % 1000}`, name: 'New class', group: 'other', hotkey: null, colour: '#BBBBBB', shape: 'circle', countsAsSperm: true }] }))}
      >
        Add a class
      </button>
      {errors.filter((e) => !/^classes\.\d+\./.test(e.path)).map((e) => <p key={e.path + e.message} className="field-error">{e.message}</p>)}
      {status && <p role="status" className={`rounded-md px-3 py-2 text-sm ${status.kind === 'ok' ? 'bg-ok-bg text-ok' : 'bg-danger-bg text-danger'}`}>{status.text}</p>}
      <button type="button" className="btn" onClick={save}>Save class set</button>
    </div>
  );
}
