// Entry of each worker thread of the CPU pool: registers tsx (so the TypeScript task module loads in the
// thread whether the server runs under tsx, vitest or node --import tsx) and hands the tasks to it.
import { register } from 'tsx/esm/api';

register();
const tasks = await import('./cpu-tasks.ts');
export default tasks.default;
