'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useId, useMemo, useState, type FormEvent } from 'react';
import { FieldError, FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { requestFit } from '@/lib/client/fits';
import { INITIAL_PORTFOLIO, PortfolioFields, portfolioRequest, type PortfolioState } from './portfolio-fields';
import { count } from '@/lib/format';
import { problemOf, type FormFieldRef, type FormProblem } from '@/lib/forms/place-errors';

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

/**
 * The New fit form: dataset (the one given, when started from a dataset page), segments, window,
 * level, the factor models, the optional bootstraps (the break test's too), small-sample
 * simulation study and challenge of the Gaussian copula (the other mixing laws, with the replications
 * of their test and its power). Every error is shown beside its field, whether found here or by the server.
 */
export function NewFitForm({ datasets, initialDatasetId }: { datasets: DatasetOption[]; initialDatasetId?: number }) {
  const id = useId();
  const router = useRouter();
  const first = datasets.find((d) => d.id === initialDatasetId) ?? datasets[0] ?? null;
  const [datasetId, setDatasetId] = useState<number | null>(first?.id ?? null);
  const dataset = datasets.find((d) => d.id === datasetId) ?? null;
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(first?.segments.map((s) => s.name) ?? []));
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
  const [copula, setCopula] = useState(false);
  const [copulaB, setCopulaB] = useState('200');
  const [copulaR, setCopulaR] = useState('200');
  const [copulaSeed, setCopulaSeed] = useState('20260104');
  const [portfolio, setPortfolio] = useState<PortfolioState>(INITIAL_PORTFOLIO);
  const [localProblem, setLocalProblem] = useState<FormProblem>(null);

  const submit = useMutation({
    mutationFn: requestFit,
    onSuccess: (res) => router.push(`/fits/${res.id}`),
  });
  const fields: readonly FormFieldRef[] = useMemo(
    () => [
      ['datasetId', `${id}-ds`],
      ['segments', `${id}-seg-0`],
      ['from', `${id}-from`],
      ['to', `${id}-to`],
      ['level', `${id}-level`],
      ['bootstrap.replications', `${id}-b-count`],
      ['bootstrap.seed', `${id}-b-seed`],
      ['audit.replications', `${id}-a-count`],
      ['audit.seed', `${id}-a-seed`],
      ['models', `${id}-models`],
      ['rollingWindow', `${id}-rolling`],
      ['breakTest.replications', `${id}-bt-count`],
      ['breakTest.seed', `${id}-bt-seed`],
      ['mixingLaws.replications', `${id}-ml-count`],
      ['mixingLaws.powerReplications', `${id}-ml-power`],
      ['mixingLaws.seed', `${id}-ml-seed`],
    ],
    [id],
  );
  const serverProblem = useMemo(() => problemOf(submit.error), [submit.error]);
  const { error, formMessage } = useFieldErrors(localProblem ?? serverProblem, fields);

  function onDataset(v: string) {
    const next = datasets.find((d) => d.id === Number(v)) ?? null;
    setDatasetId(next?.id ?? null);
    setChosen(new Set(next?.segments.map((s) => s.name) ?? []));
    setFrom('');
    setTo('');
  }

  function onSubmit(e: FormEvent) {
    e.preventDefault();
    submit.reset();
    // Checked here first so that every field's problem shows at once; the server checks again.
    const problems: Record<string, string> = {};
    if (!dataset) problems.datasetId = 'Choose a dataset.';
    if (chosen.size === 0) problems.segments = 'Choose at least one segment.';
    if (from && to && Number(from) > Number(to)) problems.to = `The window ends (${to}) before it starts (${from}).`;
    const body: Record<string, unknown> = { datasetId: dataset?.id, segments: [...chosen], level: Number(level) };
    if (from) body.from = Number(from);
    if (to) body.to = Number(to);
    const models = [...(independent ? ['independent'] : []), ...(ar1 ? ['ar1'] : [])];
    if (models.length === 0) problems.models = 'Choose at least one model.';
    body.models = models;
    if (independent) {
      const w = intOrNaN(rolling);
      if (!(w >= 3 && w <= 50)) problems.rollingWindow = 'Give a whole number of years from 3 to 50 for the rolling window.';
      body.rollingWindow = w;
      if (breakBoot) {
        const b = intOrNaN(breakB);
        const s = intOrNaN(breakSeed);
        if (!(b >= 20 && b <= 2000)) problems['breakTest.replications'] = 'Give a whole number of break-test replications from 20 to 2,000.';
        if (!Number.isFinite(s)) problems['breakTest.seed'] = 'The break-test seed must be a whole number of 0 or more.';
        body.breakTest = { replications: b, seed: s };
      }
    }
    if (boot) {
      const b = intOrNaN(bootB);
      const s = intOrNaN(bootSeed);
      if (!(b >= 20 && b <= 2000)) problems['bootstrap.replications'] = 'Give a whole number of bootstrap replications from 20 to 2,000.';
      if (!Number.isFinite(s)) problems['bootstrap.seed'] = 'The bootstrap seed must be a whole number of 0 or more.';
      body.bootstrap = { replications: b, seed: s };
    }
    if (audit) {
      const r = intOrNaN(auditR);
      const s = intOrNaN(auditSeed);
      if (!(r >= 10 && r <= 500)) problems['audit.replications'] = 'Give a whole number of simulated panels from 10 to 500.';
      if (!Number.isFinite(s)) problems['audit.seed'] = 'The simulation seed must be a whole number of 0 or more.';
      body.audit = { replications: r, seed: s };
    }
    if (copula) {
      const b = intOrNaN(copulaB);
      const r = intOrNaN(copulaR);
      const s = intOrNaN(copulaSeed);
      if (!(b >= 20 && b <= 2000)) problems['mixingLaws.replications'] = 'Give a whole number of test replications from 20 to 2,000.';
      if (!(r >= 20 && r <= 2000)) problems['mixingLaws.powerReplications'] = 'Give a whole number of power-study replications from 20 to 2,000.';
      if (!Number.isFinite(s)) problems['mixingLaws.seed'] = 'The copula seed must be a whole number of 0 or more.';
      body.mixingLaws = { replications: b, powerReplications: r, seed: s };
    }
    const keys = Object.keys(problems);
    if (keys.length > 0) return setLocalProblem({ message: problems[keys[0]], field: keys[0], fieldErrors: problems });
    const extra = portfolioRequest(portfolio, dataset!.segments.map((s) => s.name).filter((n) => chosen.has(n)));
    if ('error' in extra) return setLocalProblem({ message: extra.error });
    setLocalProblem(null);
    submit.mutate({ ...body, ...extra.body });
  }

  if (datasets.length === 0) {
    return <p className="notice-caution text-sm">There is no ready dataset yet. Upload cohort data on the Data screen first.</p>;
  }
  return (
    <form onSubmit={onSubmit} className="space-y-5" noValidate aria-label="New fit">
      <FormField id={`${id}-ds`} label="Dataset" error={error(`${id}-ds`)}>
        {(a) => (
          <select {...a} className="field" value={datasetId ?? ''} onChange={(e) => onDataset(e.target.value)}>
            {datasets.map((d) => (
              <option key={d.id} value={d.id}>
                #{d.id} {d.name} ({d.kind}, {count(d.segments.length, 'segment')}){d.superseded ? ' — superseded' : ''}
              </option>
            ))}
          </select>
        )}
      </FormField>
      <fieldset aria-describedby={error(`${id}-seg-0`) ? `${id}-seg-0-error` : undefined}>
        <legend className="label">Segments</legend>
        <div className="grid gap-1 sm:grid-cols-2">
          {dataset?.segments.map((s, i) => (
            <label key={s.name} className="flex items-center gap-2 text-sm">
              <input
                id={i === 0 ? `${id}-seg-0` : undefined}
                aria-invalid={error(`${id}-seg-0`) ? true : undefined}
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
                {s.from}–{s.to}, {count(s.periods, 'period')}
              </span>
            </label>
          ))}
        </div>
        <FieldError id={`${id}-seg-0`} error={error(`${id}-seg-0`)} />
      </fieldset>
      <div className="grid gap-3 sm:grid-cols-3">
        <YearSelect id={`${id}-from`} label="Window from" empty="first period" years={years} value={from} onChange={setFrom} error={error(`${id}-from`)} />
        <YearSelect id={`${id}-to`} label="Window to" empty="last period" years={years} value={to} onChange={setTo} error={error(`${id}-to`)} />
        <FormField id={`${id}-level`} label="Interval level" error={error(`${id}-level`)}>
          {(a) => (
            <select {...a} className="field" value={level} onChange={(e) => setLevel(e.target.value)}>
              <option value="0.9">90%</option>
              <option value="0.95">95%</option>
              <option value="0.99">99%</option>
            </select>
          )}
        </FormField>
      </div>
      <fieldset className="space-y-2">
        <legend className="label">Models</legend>
        <label className="flex items-center gap-2 text-sm">
          <input
            id={`${id}-models`}
            type="checkbox"
            checked={independent}
            onChange={(e) => setIndependent(e.target.checked)}
            aria-invalid={error(`${id}-models`) ? true : undefined}
            aria-describedby={error(`${id}-models`) ? `${id}-models-error` : undefined}
          />{' '}
          Independent years: the five
          estimators with their intervals, and the stability of ρ across the window
        </label>
        {independent ? (
          <div className="grid gap-3 pl-6 sm:grid-cols-3">
            <FormField id={`${id}-rolling`} label="Rolling window (years)" error={error(`${id}-rolling`)}>
              {(a) => <input {...a} className="field num" inputMode="numeric" value={rolling} onChange={(e) => setRolling(e.target.value)} />}
            </FormField>
            <label className="flex items-center gap-2 text-sm sm:col-span-2 sm:self-end sm:pb-2">
              <input type="checkbox" checked={breakBoot} onChange={(e) => setBreakBoot(e.target.checked)} /> p-value of the break test (a
              parametric bootstrap)
            </label>
          </div>
        ) : null}
        {independent && breakBoot ? (
          <ReplicationFields
            id={`${id}-bt`}
            countLabel="Break test replications"
            seedLabel="Break test seed"
            count={breakB}
            seed={breakSeed}
            onCount={setBreakB}
            onSeed={setBreakSeed}
            error={error}
          />
        ) : null}
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={ar1} onChange={(e) => setAr1(e.target.checked)} /> A persistent factor (AR(1)): maximum likelihood
          with φ, the test of independent years, and the autocorrelation-corrected moments
        </label>
        <FieldError id={`${id}-models`} error={error(`${id}-models`)} />
      </fieldset>
      <fieldset className="space-y-2">
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" checked={boot} onChange={(e) => setBoot(e.target.checked)} /> Parametric bootstrap of the likelihood estimate
          and of each moment estimator
        </label>
        {boot ? (
          <ReplicationFields
            id={`${id}-b`}
            countLabel="Bootstrap replications"
            seedLabel="Bootstrap seed"
            count={bootB}
            seed={bootSeed}
            onCount={setBootB}
            onSeed={setBootSeed}
            error={error}
          />
        ) : null}
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" checked={audit} onChange={(e) => setAudit(e.target.checked)} /> Small-sample simulation study (how the
          estimators behave at this sample size)
        </label>
        {audit ? (
          <ReplicationFields
            id={`${id}-a`}
            countLabel="Simulated panels"
            seedLabel="Simulation seed"
            count={auditR}
            seed={auditSeed}
            onCount={setAuditR}
            onSeed={setAuditSeed}
            error={error}
          />
        ) : null}
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" checked={copula} onChange={(e) => setCopula(e.target.checked)} /> Challenge the Gaussian copula: the t copula,
          beta and logit-normal mixing beside it, the test of the Gaussian against the t copula and its power on these cohorts
        </label>
        {copula ? (
          <div className="grid gap-3 pl-6 sm:grid-cols-3">
            <FormField id={`${id}-ml-count`} label="Test replications (B)" error={error(`${id}-ml-count`)}>
              {(a) => <input {...a} className="field num" inputMode="numeric" value={copulaB} onChange={(e) => setCopulaB(e.target.value)} />}
            </FormField>
            <FormField id={`${id}-ml-power`} label="Power replications (R)" error={error(`${id}-ml-power`)}>
              {(a) => <input {...a} className="field num" inputMode="numeric" value={copulaR} onChange={(e) => setCopulaR(e.target.value)} />}
            </FormField>
            <FormField id={`${id}-ml-seed`} label="Copula seed" error={error(`${id}-ml-seed`)}>
              {(a) => <input {...a} className="field num" inputMode="numeric" value={copulaSeed} onChange={(e) => setCopulaSeed(e.target.value)} />}
            </FormField>
          </div>
        ) : null}
        <p className="text-xs text-[var(--color-muted)]">
          The bootstraps and the simulation study take a few seconds per hundred replications and segment; the break test&apos;s
          bootstrap refits every split year, about twenty times a bootstrap replication, and the simulation study with the AR(1)
          model fits it on every panel; each replication of the copula test and of its power study fits the t copula, about twenty
          times a bootstrap replication. Seeds are stored with the run, so the numbers can be reproduced exactly.
        </p>
      </fieldset>
      <PortfolioFields id={id} state={portfolio} onChange={setPortfolio} />
      <FormMessage message={formMessage} />
      <button type="submit" className="btn" disabled={submit.isPending || submit.isSuccess}>
        {submit.isPending || submit.isSuccess ? 'Starting…' : 'Start the fit'}
      </button>
    </form>
  );
}

/** Replications and seed of the bootstrap or the simulation study. */
function ReplicationFields(props: {
  id: string;
  countLabel: string;
  seedLabel: string;
  count: string;
  seed: string;
  onCount: (v: string) => void;
  onSeed: (v: string) => void;
  error: (id: string) => string | undefined;
}) {
  return (
    <div className="grid gap-3 pl-6 sm:grid-cols-3">
      <FormField id={`${props.id}-count`} label={props.countLabel} error={props.error(`${props.id}-count`)}>
        {(a) => <input {...a} className="field num" inputMode="numeric" value={props.count} onChange={(e) => props.onCount(e.target.value)} />}
      </FormField>
      <FormField id={`${props.id}-seed`} label={props.seedLabel} error={props.error(`${props.id}-seed`)}>
        {(a) => <input {...a} className="field num" inputMode="numeric" value={props.seed} onChange={(e) => props.onSeed(e.target.value)} />}
      </FormField>
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
  error?: string;
}) {
  return (
    <FormField id={props.id} label={props.label} error={props.error}>
      {(a) => (
        <select {...a} className="field" value={props.value} onChange={(e) => props.onChange(e.target.value)}>
          <option value="">{props.empty}</option>
          {props.years.map((y) => (
            <option key={y} value={y}>
              {y}
            </option>
          ))}
        </select>
      )}
    </FormField>
  );
}
