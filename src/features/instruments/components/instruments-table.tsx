import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import { RoleBadge } from '@/components/role-badge';
import { spectrometerSummary } from './profile-summary';

/**
 * The instrument list: name (linked), description, the user's role, the spectrometer in one line.
 * `status` renders an optional line under each name (the route supplies it from other features).
 */
export function InstrumentsTable({ instruments, isAdmin, status }: { instruments: Instrument[]; isAdmin: boolean; status?: (instrument: Instrument) => ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white shadow-xs">
      <table className="min-w-full divide-y divide-slate-200 text-sm">
        <thead className="bg-slate-50 text-left text-xs font-semibold tracking-wide text-slate-500 uppercase">
          <tr>
            <th scope="col" className="px-4 py-3">Instrument</th>
            <th scope="col" className="px-4 py-3">Description</th>
            <th scope="col" className="px-4 py-3">Your role</th>
            <th scope="col" className="px-4 py-3">Spectrometer</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-slate-100">
          {instruments.map((instrument) => (
            <tr key={instrument.id} className="hover:bg-slate-50">
              <td className="px-4 py-3 font-medium whitespace-nowrap">
                <Link to={`/instruments/${instrument.id}`} className="text-accent-700 hover:underline">
                  {instrument.name}
                </Link>
                {status ? <div className="mt-0.5 text-xs font-normal text-slate-500">{status(instrument)}</div> : null}
              </td>
              <td className="max-w-md px-4 py-3 text-slate-600">
                <span className="line-clamp-2">{instrument.description || '—'}</span>
              </td>
              <td className="px-4 py-3" data-testid="my-role">
                <RoleBadge role={instrument.myRole ?? (isAdmin ? 'site admin' : null)} />
              </td>
              <td className="px-4 py-3 whitespace-nowrap text-slate-700 tabular-nums">{spectrometerSummary(instrument.profile)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
