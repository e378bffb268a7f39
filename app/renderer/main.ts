import { mount } from 'svelte';
import App from './App.svelte';
import { desktopBackend, desktopBridge } from './lib/backend-desktop';
import { httpBackend } from './lib/backend-http';
import './styles.css';

const bridge = desktopBridge();
mount(App, { target: document.getElementById('app')!, props: { backend: bridge ? desktopBackend(bridge) : httpBackend } });
