// Worker-thread entry of the compute pool. Worker threads do not inherit the TypeScript loader of
// the parent, so this plain-JavaScript file registers tsx inside the thread and then loads
// thread.ts, which answers the pool's messages (as server/engine/fit-worker-boot.mjs does).
import { register } from 'tsx/esm/api';

register();
await import(new URL('./thread.ts', import.meta.url).href);
