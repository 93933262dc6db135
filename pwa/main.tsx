/**
 * The app's entry: opens the on-device store, asks for persistent storage,
 * renders the app into #app and listens for a new version (sw-register.ts
 * registers the service worker; its update prompt never discards input).
 */
import { render } from 'preact';
import { openFieldStore, requestPersistentStorage } from './store';
import { onUpdateReady } from './sw-register';
import { App } from './ui/app';
import { AppController } from './ui/controllers/app-controller';
import './ui/styles/base.css';
import './ui/styles/layout.css';
import './ui/styles/tables.css';
import './ui/styles/charts.css';
import './ui/styles/messages.css';
import './ui/styles/answer.css';

const controller = new AppController();
const root = document.getElementById('app');
if (root) render(<App controller={controller} />, root);
void controller.start(() => openFieldStore());
void requestPersistentStorage();
onUpdateReady((apply) => controller.settings.offerUpdate(apply));
