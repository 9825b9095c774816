// Browser entry: defines the app element.
import './rb-app.ts';
import { registerServiceWorker } from './sw-register.ts';

// Store the offline copy of the app once the page has loaded, so it does not compete with the first render.
if (document.readyState === 'complete') void registerServiceWorker();
else window.addEventListener('load', () => void registerServiceWorker(), { once: true });
