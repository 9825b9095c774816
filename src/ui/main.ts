// Browser entry: defines the app element.
import './rb-app.ts';
