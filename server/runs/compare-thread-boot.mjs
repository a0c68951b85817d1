// Worker-thread entry of a compare job. Worker threads do not inherit the TypeScript loader of the
// parent, so this plain-JavaScript file registers tsx inside the thread and then loads
// compare-thread.ts (as the fit threads do, see server/engine/fit-worker-boot.mjs).
import { register } from 'tsx/esm/api';

register();
await import(new URL('./compare-thread.ts', import.meta.url).href);
