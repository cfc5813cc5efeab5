/// <reference lib="webworker" />
/**
 * Web worker that evaluates checkpoints (every figure of docs/MODEL.md section 7), completes prefixes and draws
 * noise maps, on TF.js (see worker-backend.ts).
 */
import { expose } from 'comlink';
import { EvaluatorSession, type EvaluatorBackend } from './evaluator-session';
import { setUpWorkerBackend } from './worker-backend';

let ready: Promise<EvaluatorBackend> | null = null;

expose(new EvaluatorSession(() => (ready ??= setUpWorkerBackend())));
