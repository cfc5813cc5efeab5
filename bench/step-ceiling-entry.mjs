// Entry of a ceiling thread of bench/step-ceiling.ts: TypeScript through tsx, then the thread's own module.
import { register } from 'tsx/esm/api';

register();
await import('./step-ceiling-thread.ts');
