// Browser entry: defines the app element.
import './rb-app.ts';
import { afterFiguresShown } from './first-figures.ts';
import { registerServiceWorker } from './sw-register.ts';

// Store the offline copy of the app once the page has loaded and shown its first figures: fetching and storing every
// file competed with the first view for the CPU.
const register = (): void => afterFiguresShown(() => void registerServiceWorker());
if (document.readyState === 'complete') register();
else window.addEventListener('load', register, { once: true });
