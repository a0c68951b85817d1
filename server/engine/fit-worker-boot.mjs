// Worker-thread entry of a fit. Worker threads do not inherit the TypeScript loader of the parent,
// so this plain-JavaScript file registers tsx inside the thread and then loads fit-worker.ts, which
// answers the main thread's messages. Works the same under `tsx` and under the test runner.
import { register } from 'tsx/esm/api';

register();
await import(new URL('./fit-worker.ts', import.meta.url).href);
