import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './app/app';
import './index.css';
import { installFocusFirstInvalid } from './lib/focus-invalid';

installFocusFirstInvalid(document);

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <App />
  </StrictMode>,
);
