import { createBrowserRouter, Navigate } from 'react-router-dom';
import { AppLayout } from './app-layout';
import { RequireAuth } from './require-auth';
import { SignInRoute } from './routes/sign-in';
import { AcceptInvitationRoute } from './routes/accept-invitation';
import { InstrumentsRoute } from './routes/instruments';
import { NewInstrumentRoute } from './routes/instrument-new';
import { InstrumentRoute } from './routes/instrument';
import { EditInstrumentRoute } from './routes/instrument-edit';
import { MembersRoute } from './routes/members';
import { OutboxRoute } from './routes/outbox';
import { AccountRoute } from './routes/account';
import { NotFoundRoute } from './routes/not-found';
import { FramesRoute } from './routes/frames';
import { FrameViewerRoute } from './routes/frame-viewer';
import { WorkbenchRoute } from './routes/workbench';
import { VersionRoute } from './routes/version';
import { SpectrumRoute } from './routes/spectrum';
import { RunRoute } from './routes/run';
import { InstrumentSpectraRoute } from './routes/instrument-spectra';
import { VersionReportRoute } from './routes/version-report';

/** Every page of the client. Public: sign-in and the invitation link; the rest needs a session. */
export const routes = [
  // The printable calibration report: signed-in, but outside the app frame so paper holds only the report.
  { element: <RequireAuth />, children: [{ path: '/versions/:versionId/report', element: <VersionReportRoute /> }] },
  {
    element: <AppLayout />,
    children: [
      { path: '/sign-in', element: <SignInRoute /> },
      { path: '/invite/:token', element: <AcceptInvitationRoute /> },
      {
        element: <RequireAuth />,
        children: [
          { path: '/', element: <Navigate to="/instruments" replace /> },
          { path: '/instruments', element: <InstrumentsRoute /> },
          { path: '/instruments/new', element: <NewInstrumentRoute /> },
          { path: '/instruments/:instrumentId', element: <InstrumentRoute /> },
          { path: '/instruments/:instrumentId/edit', element: <EditInstrumentRoute /> },
          { path: '/instruments/:instrumentId/members', element: <MembersRoute /> },
          { path: '/account', element: <AccountRoute /> },
          { path: '/frames', element: <FramesRoute /> },
          { path: '/frames/:frameId', element: <FrameViewerRoute /> },
          { path: '/instruments/:instrumentId/workbench', element: <WorkbenchRoute /> },
          { path: '/versions/:versionId', element: <VersionRoute /> },
          { path: '/frames/:frameId/spectrum', element: <SpectrumRoute /> },
          { path: '/runs/:runId', element: <RunRoute /> },
          { path: '/instruments/:instrumentId/spectra', element: <InstrumentSpectraRoute /> },
        ],
      },
      { element: <RequireAuth adminOnly />, children: [{ path: '/outbox', element: <OutboxRoute /> }] },
      { path: '*', element: <NotFoundRoute /> },
    ],
  },
];

/** The browser router over {@link routes}. */
export const createAppRouter = () => createBrowserRouter(routes);
