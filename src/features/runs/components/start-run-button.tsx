import { useNavigate } from 'react-router-dom';
import type { CreateRunInput } from '../../../../shared/api/runs.ts';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { useCreateRun } from '../api/create-run';

export interface StartRunButtonProps {
  instrumentId: string;
  /** Frames by id, or every signal frame of the instrument with a scan variable. */
  input: CreateRunInput;
  label: string;
}

/** Starts a background run and opens its page. */
export function StartRunButton({ instrumentId, input, label }: StartRunButtonProps) {
  const create = useCreateRun(instrumentId);
  const navigate = useNavigate();
  return (
    <span className="inline-flex flex-col gap-2">
      <Button pending={create.isPending} onClick={() => create.mutate(input, { onSuccess: (run) => navigate(`/runs/${run.id}`) })}>
        {label}
      </Button>
      <ErrorAlert error={create.error} title="The run did not start" />
    </span>
  );
}
