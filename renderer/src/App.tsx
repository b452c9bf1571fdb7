// The window: a navigation bar and the view the address names. Views are listed once here;
// a later view is one more route in routes.ts and one more case below.
import { useEffect, useState } from 'react';
import type { LabApi } from '../../app/api/contract';
import { CheckPage } from './CheckPage';
import { DocumentsPage } from './DocumentsPage';
import { FitForUsePage } from './FitForUsePage';
import { MeterPage } from './MeterPage';
import { RecordCheckPage } from './RecordCheckPage';
import { RegisterPage } from './RegisterPage';
import { SettingsPage } from './SettingsPage';
import { StandardsPage } from './StandardsPage';
import { href, parseRoute, section } from './routes';
import type { Route } from './routes';

const TABS = [
  { key: 'register', label: 'Register', to: href.register() },
  { key: 'record', label: 'Record a check', to: href.record() },
  { key: 'use', label: 'Fit for use', to: href.use() },
  { key: 'standards', label: 'Lab standards', to: href.standards() },
  { key: 'documents', label: 'Documents', to: href.documents() },
  { key: 'settings', label: 'Settings', to: href.settings() },
] as const;

export function App({ api, win = window }: { api: LabApi; win?: Window }) {
  const [route, setRoute] = useState<Route>(() => parseRoute(win.location.hash));
  useEffect(() => {
    const onHash = () => {
      setRoute(parseRoute(win.location.hash));
      win.scrollTo?.(0, 0);
    };
    win.addEventListener('hashchange', onHash);
    return () => win.removeEventListener('hashchange', onHash);
  }, [win]);
  const current = section(route);

  return (
    <>
      <nav className="topnav" aria-label="Views">
        <span className="brand">Dipledger</span>
        <ul>
          {TABS.map((t) => (
            <li key={t.key}>
              <a href={t.to} aria-current={current === t.key ? 'page' : undefined}>
                {t.label}
              </a>
            </li>
          ))}
        </ul>
      </nav>
      <View api={api} route={route} />
    </>
  );
}

function View({ api, route }: { api: LabApi; route: Route }) {
  switch (route.view) {
    case 'register':
      return <RegisterPage api={api} />;
    case 'meter':
      return <MeterPage key={route.assetId} api={api} assetId={route.assetId} />;
    case 'check':
      return <CheckPage key={route.checkId} api={api} checkId={route.checkId} />;
    case 'record':
      return (
        <RecordCheckPage
          key={`${route.assetId ?? ''}/${route.draftId ?? ''}`}
          api={api}
          assetId={route.assetId}
          draftId={route.draftId}
        />
      );
    case 'use':
      return <FitForUsePage api={api} />;
    case 'standards':
      return <StandardsPage api={api} />;
    case 'documents':
      return <DocumentsPage api={api} />;
    case 'settings':
      return <SettingsPage api={api} />;
    case 'missing':
      return (
        <div className="page">
          <header className="masthead">
            <h1>No such view</h1>
          </header>
          <p role="alert">
            Nothing is found at “{route.hash}”. <a href={href.register()}>Back to the register</a>.
          </p>
        </div>
      );
  }
}
