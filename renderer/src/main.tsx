// Renderer entry: mounts the app (navigation and views) on the lab client chosen for this window.
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { labClient } from './api';
import { App } from './App';
import './styles.css';

const root = document.getElementById('root');
if (!root) throw new Error('index.html has no #root element');
const api = labClient();
createRoot(root).render(
  <StrictMode>
    <App api={api} />
  </StrictMode>,
);
