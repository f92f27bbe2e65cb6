import { useState, type FormEvent } from 'react';
import { driftThresholdSchema } from '../../../../shared/api/spectra.ts';
import type { DriftThreshold } from '../../../../shared/analysis/drift.ts';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { useSetDriftThreshold } from '../api/set-drift-threshold';

/** The owner's drift threshold: flag when |shift| > sigma·σ and > px (checked with the server's schema). */
export function DriftThresholdForm({ instrumentId, threshold }: { instrumentId: string; threshold: DriftThreshold }) {
  const [sigma, setSigma] = useState(String(threshold.sigma));
  const [px, setPx] = useState(String(threshold.px));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const save = useSetDriftThreshold(instrumentId);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = driftThresholdSchema.safeParse({ sigma: Number(sigma), px: Number(px) });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    save.mutate(parsed.data);
  };
  return (
    <form aria-label="Drift threshold" className="flex flex-wrap items-end gap-4" onSubmit={submit}>
      <div className="w-40">
        <TextField label="Threshold (σ)" inputMode="decimal" value={sigma} onChange={(e) => setSigma(e.target.value)} error={errors.sigma} />
      </div>
      <div className="w-40">
        <TextField label="Threshold (px)" inputMode="decimal" value={px} onChange={(e) => setPx(e.target.value)} error={errors.px} />
      </div>
      <Button type="submit" pending={save.isPending} className="mb-0.5">
        Save threshold
      </Button>
      {save.isSuccess ? (
        <p className="text-sm text-accent-800" role="status">
          Saved; new spectra are flagged with it.
        </p>
      ) : null}
      <div className="basis-full">
        <ErrorAlert error={save.error} title="The threshold was not saved" />
      </div>
    </form>
  );
}
