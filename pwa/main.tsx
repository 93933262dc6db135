/**
 * The app's entry: opens the on-device store, asks for persistent storage,
 * renders the app into #app and listens for a new version (sw-register.ts
 * registers the service worker; its update prompt never discards input).
 */
import { render } from 'preact';
import { openFieldStore, requestPersistentStorage } from './store';
import { onUpdateReady } from './sw-register';
import { App } from './ui/app';
import { Controller } from './ui/controller';
import './ui/styles.css';

const controller = new Controller();
const root = document.getElementById('app');
if (root) render(<App controller={controller} />, root);
void controller.start(() => openFieldStore());
void requestPersistentStorage();
onUpdateReady((apply) => controller.offerUpdate(apply));
