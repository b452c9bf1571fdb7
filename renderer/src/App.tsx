// The window: a navigation bar and the view the address names. Views are listed once here;
// a later view is one more route in routes.ts and one more case below.
import { useEffect, useState } from 'react';
import type { LabApi } from '../../app/api/contract';
import { CheckPage } from './check/CheckPage';
import { DocumentsPage } from './documents/DocumentsPage';
import { FitForUsePage } from './use/FitForUsePage';
import { MeterPage } from './meter/MeterPage';
import { RecordCheckPage } from './record/RecordCheckPage';
import { RegisterPage } from './register/RegisterPage';
import { SettingsPage } from './settings/SettingsPage';
import { StandardsPage } from './standards/StandardsPage';
import { LabProvider } from './lab/LabContext';
import { AnnounceProvider, focusQuietly, useFocusOnViewChange, viewHeading } from './shared/a11y';
import { href, parseRoute, section } from './shared/routes';
import type { Route } from './shared/routes';

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
  useFocusOnViewChange(JSON.stringify(route), win.document);

  return (
    <LabProvider api={api}>
      <AnnounceProvider>
        <a
          className="skip-link"
          href="#main"
          onClick={(e) => {
            // The address is the router's: skipping moves focus only.
            e.preventDefault();
            focusQuietly(viewHeading(win.document) ?? win.document.querySelector<HTMLElement>('main'));
          }}
        >
          Skip to main content
        </a>
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
        <main id="main">
          <View route={route} />
        </main>
      </AnnounceProvider>
    </LabProvider>
  );
}

function View({ route }: { route: Route }) {
  switch (route.view) {
    case 'register':
      return <RegisterPage />;
    case 'meter':
      return <MeterPage key={route.assetId} assetId={route.assetId} />;
    case 'check':
      return <CheckPage key={route.checkId} checkId={route.checkId} />;
    case 'record':
      return (
        <RecordCheckPage
          key={`${route.assetId ?? ''}/${route.draftId ?? ''}`}

          assetId={route.assetId}
          draftId={route.draftId}
        />
      );
    case 'use':
      return <FitForUsePage />;
    case 'standards':
      return <StandardsPage />;
    case 'documents':
      return <DocumentsPage />;
    case 'settings':
      return <SettingsPage />;
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
