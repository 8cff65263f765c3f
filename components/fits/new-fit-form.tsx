'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useId, useMemo, useState, type FormEvent } from 'react';
import type { AppError } from '@/lib/errors';
import { requestFit } from '@/lib/client/fits';
import { INITIAL_PORTFOLIO, PortfolioFields, portfolioRequest, type PortfolioState } from './portfolio-fields';

export type DatasetOption = {
  id: number;
  name: string;
  kind: string;
  superseded: boolean;
  segments: { name: string; from: number; to: number; periods: number }[];
};

function intOrNaN(s: string): number {
  return /^\s*\d+\s*$/.test(s) ? Number(s) : Number.NaN;
}

/** The New fit form: dataset, segments, window, level, the factor models, optional bootstraps (the break test's too) and audit. */
export function NewFitForm({ datasets }: { datasets: DatasetOption[] }) {
  const id = useId();
  const router = useRouter();
  const [datasetId, setDatasetId] = useState<number | null>(datasets[0]?.id ?? null);
  const dataset = datasets.find((d) => d.id === datasetId) ?? null;
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(datasets[0]?.segments.map((s) => s.name) ?? []));
  const years = useMemo(() => {
    if (!dataset || dataset.segments.length === 0) return [];
    const lo = Math.min(...dataset.segments.map((s) => s.from));
    const hi = Math.max(...dataset.segments.map((s) => s.to));
    return Array.from({ length: hi - lo + 1 }, (_, i) => lo + i);
  }, [dataset]);
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const [level, setLevel] = useState('0.95');
  const [boot, setBoot] = useState(true);
  const [bootB, setBootB] = useState('200');
  const [bootSeed, setBootSeed] = useState('20260101');
  const [independent, setIndependent] = useState(true);
  const [ar1, setAr1] = useState(true);
  const [rolling, setRolling] = useState('10');
  const [breakBoot, setBreakBoot] = useState(false);
  const [breakB, setBreakB] = useState('200');
  const [breakSeed, setBreakSeed] = useState('20260103');
  const [audit, setAudit] = useState(false);
  const [auditR, setAuditR] = useState('50');
  const [auditSeed, setAuditSeed] = useState('20260102');
  const [portfolio, setPortfolio] = useState<PortfolioState>(INITIAL_PORTFOLIO);
  const [localError, setLocalError] = useState<string | null>(null);

  const submit = useMutation({
    mutationFn: requestFit,
    onSuccess: (res) => router.push(`/fits/${res.id}`),
  });

  function onDataset(v: string) {
    const next = datasets.find((d) => d.id === Number(v)) ?? null;
    setDatasetId(next?.id ?? null);
    setChosen(new Set(next?.segments.map((s) => s.name) ?? []));
    setFrom('');
    setTo('');
  }

  function onSubmit(e: FormEvent) {
    e.preventDefault();
    setLocalError(null);
    if (!dataset) return setLocalError('Choose a dataset.');
    if (chosen.size === 0) return setLocalError('Choose at least one segment.');
    const body: Record<string, unknown> = { datasetId: dataset.id, segments: [...chosen], level: Number(level) };
    if (from) body.from = Number(from);
    if (to) body.to = Number(to);
    const models = [...(independent ? ['independent'] : []), ...(ar1 ? ['ar1'] : [])];
    if (models.length === 0) return setLocalError('Models: choose at least one.');
    body.models = models;
    if (independent) {
      const w = intOrNaN(rolling);
      if (!(w >= 3 && w <= 50)) return setLocalError('Rolling window: give a whole number of years from 3 to 50.');
      body.rollingWindow = w;
      if (breakBoot) {
        const b = intOrNaN(breakB);
        const s = intOrNaN(breakSeed);
        if (!(b >= 20 && b <= 2000)) return setLocalError('Break test replications: give a whole number from 20 to 2,000.');
        if (!Number.isFinite(s)) return setLocalError('Break test seed: give a whole number.');
        body.breakTest = { replications: b, seed: s };
      }
    }
    if (boot) {
      const b = intOrNaN(bootB);
      const s = intOrNaN(bootSeed);
      if (!(b >= 20 && b <= 2000)) return setLocalError('Bootstrap replications: give a whole number from 20 to 2,000.');
      if (!Number.isFinite(s)) return setLocalError('Bootstrap seed: give a whole number.');
      body.bootstrap = { replications: b, seed: s };
    }
    if (audit) {
      const r = intOrNaN(auditR);
      const s = intOrNaN(auditSeed);
      if (!(r >= 10 && r <= 500)) return setLocalError('Audit replications: give a whole number from 10 to 500.');
      if (!Number.isFinite(s)) return setLocalError('Audit seed: give a whole number.');
      body.audit = { replications: r, seed: s };
    }
    const extra = portfolioRequest(portfolio, dataset.segments.map((s) => s.name).filter((n) => chosen.has(n)));
    if ('error' in extra) return setLocalError(extra.error);
    submit.mutate({ ...body, ...extra.body });
  }

  if (datasets.length === 0) {
    return <p className="notice-caution text-sm">There is no ready dataset yet. Upload cohort data on the Data screen first.</p>;
  }
  const serverError = submit.error as AppError | null;
  return (
    <form onSubmit={onSubmit} className="space-y-5" noValidate>
      <div>
        <label className="label" htmlFor={`${id}-ds`}>
          Dataset
        </label>
        <select id={`${id}-ds`} className="field" value={datasetId ?? ''} onChange={(e) => onDataset(e.target.value)}>
          {datasets.map((d) => (
            <option key={d.id} value={d.id}>
              #{d.id} {d.name} ({d.kind}, {d.segments.length} segment{d.segments.length === 1 ? '' : 's'}){d.superseded ? ' — superseded' : ''}
            </option>
          ))}
        </select>
      </div>
      <fieldset>
        <legend className="label">Segments</legend>
        <div className="grid gap-1 sm:grid-cols-2">
          {dataset?.segments.map((s) => (
            <label key={s.name} className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                checked={chosen.has(s.name)}
                onChange={(e) => {
                  const next = new Set(chosen);
                  if (e.target.checked) next.add(s.name);
                  else next.delete(s.name);
                  setChosen(next);
                }}
              />
              {s.name}{' '}
              <span className="text-xs text-[var(--color-muted)]">
                {s.from}–{s.to}, {s.periods} periods
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <div className="grid gap-3 sm:grid-cols-3">
        <YearSelect id={`${id}-from`} label="Window from" empty="first period" years={years} value={from} onChange={setFrom} />
        <YearSelect id={`${id}-to`} label="Window to" empty="last period" years={years} value={to} onChange={setTo} />
        <div>
          <label className="label" htmlFor={`${id}-level`}>
            Interval level
          </label>
          <select id={`${id}-level`} className="field" value={level} onChange={(e) => setLevel(e.target.value)}>
            <option value="0.9">90%</option>
            <option value="0.95">95%</option>
            <option value="0.99">99%</option>
          </select>
        </div>
      </div>
      <fieldset className="space-y-2">
        <legend className="label">Models</legend>
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={independent} onChange={(e) => setIndependent(e.target.checked)} /> Independent years: the five
          estimators with their intervals, and the stability of ρ across the window
        </label>
        {independent ? (
          <div className="grid gap-3 pl-6 sm:grid-cols-3">
            <div>
              <label className="label" htmlFor={`${id}-rolling`}>
                Rolling window (years)
              </label>
              <input id={`${id}-rolling`} className="field num" inputMode="numeric" value={rolling} onChange={(e) => setRolling(e.target.value)} />
            </div>
            <label className="flex items-center gap-2 text-sm sm:col-span-2 sm:self-end sm:pb-2">
              <input type="checkbox" checked={breakBoot} onChange={(e) => setBreakBoot(e.target.checked)} /> p-value of the break test (a
              parametric bootstrap)
            </label>
          </div>
        ) : null}
        {independent && breakBoot ? (
          <ReplicationFields id={`${id}-bt`} what="Break test" count={breakB} seed={breakSeed} onCount={setBreakB} onSeed={setBreakSeed} />
        ) : null}
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={ar1} onChange={(e) => setAr1(e.target.checked)} /> A persistent factor (AR(1)): maximum likelihood
          with φ, the test of independent years, and the autocorrelation-corrected moments
        </label>
      </fieldset>
      <fieldset className="space-y-2">
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" checked={boot} onChange={(e) => setBoot(e.target.checked)} /> Parametric bootstrap of the likelihood estimate
          and of each moment estimator
        </label>
        {boot ? (
          <ReplicationFields id={`${id}-b`} what="Bootstrap" count={bootB} seed={bootSeed} onCount={setBootB} onSeed={setBootSeed} />
        ) : null}
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" checked={audit} onChange={(e) => setAudit(e.target.checked)} /> Estimator audit at this sample size
        </label>
        {audit ? (
          <ReplicationFields id={`${id}-a`} what="Audit" count={auditR} seed={auditSeed} onCount={setAuditR} onSeed={setAuditSeed} />
        ) : null}
        <p className="text-xs text-[var(--color-muted)]">
          The bootstraps and the audit take a few seconds per hundred replications and segment; the break test&apos;s bootstrap
          refits every split year, about twenty times a bootstrap replication, and the audit with the AR(1) model fits it on every
          panel. Seeds are stored with the run, so the numbers can be reproduced exactly.
        </p>
      </fieldset>
      <PortfolioFields id={id} state={portfolio} onChange={setPortfolio} />
      {localError || serverError ? (
        <p className="notice-bad text-sm" role="alert">
          {localError ?? serverError?.message}
        </p>
      ) : null}
      <button type="submit" className="btn" disabled={submit.isPending || submit.isSuccess}>
        {submit.isPending || submit.isSuccess ? 'Starting…' : 'Start the fit'}
      </button>
    </form>
  );
}

/** Replications and seed of the bootstrap or the audit. */
function ReplicationFields(props: {
  id: string;
  what: string;
  count: string;
  seed: string;
  onCount: (v: string) => void;
  onSeed: (v: string) => void;
}) {
  return (
    <div className="grid gap-3 pl-6 sm:grid-cols-3">
      <div>
        <label className="label" htmlFor={`${props.id}-count`}>
          {props.what} replications
        </label>
        <input id={`${props.id}-count`} className="field num" inputMode="numeric" value={props.count} onChange={(e) => props.onCount(e.target.value)} />
      </div>
      <div>
        <label className="label" htmlFor={`${props.id}-seed`}>
          {props.what} seed
        </label>
        <input id={`${props.id}-seed`} className="field num" inputMode="numeric" value={props.seed} onChange={(e) => props.onSeed(e.target.value)} />
      </div>
    </div>
  );
}

/** One end of the fit window: a year of the dataset, or empty for the first or last period. */
function YearSelect(props: {
  id: string;
  label: string;
  empty: string;
  years: readonly (string | number)[];
  value: string;
  onChange: (v: string) => void;
}) {
  return (
    <div>
      <label className="label" htmlFor={props.id}>
        {props.label}
      </label>
      <select id={props.id} className="field" value={props.value} onChange={(e) => props.onChange(e.target.value)}>
        <option value="">{props.empty}</option>
        {props.years.map((y) => (
          <option key={y} value={y}>
            {y}
          </option>
        ))}
      </select>
    </div>
  );
}
