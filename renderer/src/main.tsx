// Renderer entry: mounts the app (navigation and views) on the lab client chosen for this window.
import './base.css';
import './shared/shared.css';
import './shared/forms.css';
import './shared/reflow.css';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { labClient } from './lab/client';
import { App } from './App';

const root = document.getElementById('root');
if (!root) throw new Error('index.html has no #root element');
const api = labClient();
createRoot(root).render(
  <StrictMode>
    <App api={api} />
  </StrictMode>,
);
