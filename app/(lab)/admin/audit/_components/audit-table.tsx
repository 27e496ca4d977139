'use client';

import { createColumnHelper } from '@tanstack/react-table';
import { useMemo, useState, type ReactNode } from 'react';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { DataTable } from '@/components/ui/data-table';
import type { AuditRow } from '@/db/queries/audit-log';
import { fmtDateTime } from '@/lib/format';

const show = (v: unknown) => (v === undefined ? '—' : typeof v === 'string' ? v : JSON.stringify(v));
/** A value cut to a line's worth; the whole value is in the row's "whole record" details. */
const brief = (v: unknown) => {
  const t = show(v);
  return t.length > 48 ? `${t.slice(0, 47)}…` : t;
};
const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** One record as it was stored (a creation or a removal): its fields with values, long ones cut. */
function RecordFields({ label, value }: { label: string; value: unknown }) {
  if (!isRecord(value)) return <p className="break-all"><span className="font-medium">{label}</span> {show(value)}</p>;
  const keys = Object.keys(value).filter((k) => value[k] !== null && value[k] !== '');
  return (
    <div>
      <p className="font-medium">{label}</p>
      <ul className="space-y-0.5">
        {keys.map((k) => (
          <li key={k} className="break-all"><span className="text-ink-soft">{k}</span>: {brief(value[k])}</li>
        ))}
      </ul>
    </div>
  );
}

/** Before and after, field by field: only what changed when both are records, else each as it was stored. */
function Changes({ before, after }: { before: unknown; after: unknown }) {
  let body: ReactNode;
  if (isRecord(before) && isRecord(after)) {
    const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])].filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]));
    body = keys.length === 0 ? <span className="text-ink-faint">no field changed</span> : (
      <ul className="space-y-0.5">
        {keys.map((k) => (
          <li key={k} className="break-all"><span className="font-medium">{k}</span>: {brief(before[k])} → {brief(after[k])}</li>
        ))}
      </ul>
    );
  } else {
    body = (
      <div className="space-y-1">
        {before != null && <RecordFields label="before" value={before} />}
        {after != null && <RecordFields label="after" value={after} />}
      </div>
    );
  }
  const whole = JSON.stringify({ before, after }, null, 1);
  return (
    <div className="space-y-1">
      {body}
      {whole.length > 120 && (
        <details>
          <summary className="cursor-pointer text-ink-soft">whole record</summary>
          <pre className="whitespace-pre-wrap break-all">{whole}</pre>
        </details>
      )}
    </div>
  );
}

const c = createColumnHelper<AuditRow>();
const columnsFor = (timeZone: string) => [
  c.accessor('at', { id: 'createdAt', header: 'When', cell: (i) => fmtDateTime(i.getValue(), timeZone) }),
  c.accessor('userName', { id: 'user', header: 'Who', enableSorting: false, cell: (i) => i.getValue() ?? '—' }),
  c.accessor('action', { id: 'action', header: 'Action', enableSorting: false }),
  c.accessor('entity', { id: 'entity', header: 'Record type', enableSorting: false }),
  c.accessor('entityId', { id: 'entityId', header: 'Record', enableSorting: false, cell: (i) => i.getValue() ?? '—' }),
  c.accessor('reason', { id: 'reason', header: 'Reason', enableSorting: false, cell: (i) => i.getValue() ?? '' }),
  c.display({ id: 'changes', header: 'Before → after', cell: (i) => <div className="max-w-md text-xs"><Changes before={i.row.original.before} after={i.row.original.after} /></div> }),
];

export function AuditTable({ people, entities }: { people: { id: number; name: string }[]; entities: string[] }) {
  const timeZone = useLabTimeZone();
  const columns = useMemo(() => columnsFor(timeZone), [timeZone]);
  const [userId, setUserId] = useState('');
  const [entity, setEntity] = useState('');
  const [entityId, setEntityId] = useState('');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-3">
        <div>
          <label htmlFor="audit-person" className="label">Person</label>
          <select id="audit-person" className="input" value={userId} onChange={(e) => setUserId(e.target.value)}>
            <option value="">Everyone</option>
            {people.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="audit-entity" className="label">Record type</label>
          <select id="audit-entity" className="input" value={entity} onChange={(e) => setEntity(e.target.value)}>
            <option value="">All types</option>
            {entities.map((x) => <option key={x} value={x}>{x}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="audit-record" className="label">Record (id)</label>
          <input id="audit-record" className="input w-32" value={entityId} onChange={(e) => setEntityId(e.target.value.trim())} />
        </div>
        <div>
          <label htmlFor="audit-from" className="label">From</label>
          <input id="audit-from" type="date" className="input" value={from} onChange={(e) => setFrom(e.target.value)} />
        </div>
        <div>
          <label htmlFor="audit-to" className="label">To</label>
          <input id="audit-to" type="date" className="input" value={to} onChange={(e) => setTo(e.target.value)} />
        </div>
      </div>
      <DataTable<AuditRow>
        label="Audit log"
        endpoint="/api/audit"
        columns={columns}
        defaultSort={{ id: 'createdAt', desc: true }}
        filters={{ userId: userId || undefined, entity: entity || undefined, entityId: entityId || undefined, from: from || undefined, to: to || undefined }}
        searchLabel="Action (e.g. sign, amend, update)"
        empty="Nothing matches these filters."
      />
    </div>
  );
}
