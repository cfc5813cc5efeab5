// Entry of a runner worker thread: TypeScript through tsx (whether or not the parent process runs under tsx),
// then the thread's own module.
import { register } from 'tsx/esm/api';

register();
await import('./job-thread.ts');
