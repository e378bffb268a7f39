/** The application menu: the frequent actions with their shortcuts (the help panel lists the same keys). */
import type { MenuItemConstructorOptions } from 'electron';
import type { MenuCommand } from './ipc-channels';

export function applicationMenuTemplate(send: (command: MenuCommand) => void, platform: NodeJS.Platform): MenuItemConstructorOptions[] {
  const mac = platform === 'darwin';
  return [
    ...(mac ? [{ role: 'appMenu' as const }] : []),
    {
      label: 'File',
      submenu: [
        { label: 'Open image…', accelerator: 'CmdOrCtrl+O', click: () => send('open-image') },
        { label: 'Open the demo sample', accelerator: 'CmdOrCtrl+Shift+D', click: () => send('open-demo') },
        { type: 'separator' },
        mac ? { role: 'close' } : { role: 'quit' },
      ],
    },
    {
      label: 'View',
      submenu: [
        { label: 'Fit image to view', accelerator: 'F', registerAccelerator: false, click: () => send('fit-view') },
        { label: 'Switch dark or light theme', accelerator: 'CmdOrCtrl+Shift+L', click: () => send('toggle-theme') },
        { type: 'separator' },
        { role: 'resetZoom' },
        { role: 'zoomIn' },
        { role: 'zoomOut' },
        { role: 'togglefullscreen' },
      ],
    },
    { label: 'Help', submenu: [{ label: 'Keyboard shortcuts', accelerator: 'F1', click: () => send('show-help') }] },
  ];
}
