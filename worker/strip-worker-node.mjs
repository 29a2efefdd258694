// Node cannot start a .ts worker by itself: register tsx inside the thread, then load the entry.
import { register } from 'tsx/esm/api';

register();
await import('./strip-node-entry.ts');
