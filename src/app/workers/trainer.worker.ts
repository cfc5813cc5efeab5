/// <reference lib="webworker" />
/**
 * Web worker that trains one run on TF.js (see worker-backend.ts); the page talks to it through comlink
 * (`TrainerApi`, see trainer-client.ts).
 */
import '@tensorflow/tfjs-core/dist/register_all_gradients';
import { expose } from 'comlink';
import { TrainerSession, type BackendReport } from './trainer-session';
import { setUpWorkerBackend } from './worker-backend';

let ready: Promise<BackendReport> | null = null;

expose(new TrainerSession(() => (ready ??= setUpWorkerBackend())));
