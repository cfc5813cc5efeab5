/**
 * Settings, validation and parameter layout of the stochastic state-space model (MODEL.md sections 2 and 4).
 * Parameter names here are the names stored in checkpoints: core parameters as below, the generative flow
 * under `gen/` and the inference flow under `inf/`.
 */
import { SOFTPLUS_INVERSE_OF_ONE } from './flows/conditioner';
import { flowParamSpecs, validateFlowSpec, type FlowSpec } from './flows/flow';
import { countParams, glorot, prefixSpecs, zeros, type ParamSpecs } from './params';
import { SETTING_LIMITS } from './settings-rules';

export interface SsmSettings {
  /** State (and noise) size d. */
  stateSize: number;
  /** Vocabulary size V = alphabet size + 1 (EOW). */
  vocabSize: number;
  /** Generative transition flow f_g: xi -> h given h_{t-1}. */
  generativeFlow: FlowSpec[];
  /** Inference flow f_q: xi -> h given h_{t-1} (own weights). */
  inferenceFlow: FlowSpec[];
  /** Hidden width of every flow's conditioning networks. */
  flowHidden: number;
  /** Hidden width of the observation MLP; 0 = linear observation layer. */
  observationHidden: number;
  /** Character embedding size of the inference network. */
  embeddingSize: number;
  /** Hidden size of the backward GRU of the inference network. */
  encoderSize: number;
  /** Hidden width of the proposal MLP on [h_{t-1}, b_t]. */
  proposalHidden: number;
}

/** Reasonable defaults for a state size and vocabulary (any field can be overridden). */
export function defaultSsmSettings(vocabSize: number, overrides: Partial<SsmSettings> = {}): SsmSettings {
  const stateSize = overrides.stateSize ?? 16;
  return {
    stateSize,
    vocabSize,
    generativeFlow: [{ kind: 'diag' }],
    inferenceFlow: [{ kind: 'diag' }],
    flowHidden: 32,
    observationHidden: 0,
    embeddingSize: 16,
    encoderSize: 32,
    proposalHidden: 32,
    ...overrides,
  };
}

const LIMITS: Record<keyof Omit<SsmSettings, 'generativeFlow' | 'inferenceFlow'>, readonly [number, number]> = {
  stateSize: SETTING_LIMITS.stateSize,
  vocabSize: SETTING_LIMITS.vocabSize,
  flowHidden: SETTING_LIMITS.flowHidden,
  observationHidden: SETTING_LIMITS.observationHidden,
  embeddingSize: SETTING_LIMITS.embeddingSize,
  encoderSize: SETTING_LIMITS.encoderSize,
  proposalHidden: SETTING_LIMITS.proposalHidden,
};

/** Throws an error that names the bad setting and its allowed range. */
export function validateSsmSettings(settings: SsmSettings): void {
  if (!settings || typeof settings !== 'object') throw new Error('Model settings are missing.');
  for (const [key, [lo, hi]] of Object.entries(LIMITS)) {
    const v = (settings as unknown as Record<string, unknown>)[key];
    if (typeof v !== 'number' || !Number.isInteger(v) || v < lo || v > hi) {
      throw new Error(`Setting "${key}" must be a whole number from ${lo} to ${hi}; got ${JSON.stringify(v)}.`);
    }
  }
  validateFlowSpec(settings.generativeFlow, 'generative flow');
  validateFlowSpec(settings.inferenceFlow, 'inference flow');
}

/** Every parameter of the model (names, shapes, initialisers), before any tensor exists. */
export function ssmCoreParamSpecs(s: SsmSettings): ParamSpecs {
  const d = s.stateSize;
  const V = s.vocabSize;
  const H = s.encoderSize;
  const P = s.proposalHidden;
  const specs: ParamSpecs = { h0: zeros([d]) };
  if (s.observationHidden > 0) {
    Object.assign(specs, {
      'obs.w1': glorot(d, s.observationHidden),
      'obs.b1': zeros([s.observationHidden]),
      'obs.w2': glorot(s.observationHidden, V),
      'obs.b2': zeros([V]),
    });
  } else {
    Object.assign(specs, { 'obs.w': glorot(d, V), 'obs.b': zeros([V]) });
  }
  Object.assign(specs, {
    'enc.embed': glorot(V, s.embeddingSize),
    // GRU: input and recurrent projections for the three gates (reset, update, candidate) fused column-wise.
    'enc.wx': glorot(s.embeddingSize, 3 * H),
    'enc.bx': zeros([3 * H]),
    'enc.wh': glorot(H, 3 * H),
    'enc.bh': zeros([3 * H]),
    // Proposal MLP on [h_{t-1}, b_t]: the first layer is split into its h and b parts.
    'prop.wh': glorot(d, P),
    'prop.wb': glorot(H, P),
    'prop.b1': zeros([P]),
    'prop.w2': glorot(P, 2 * d, 0.5),
    'prop.b2': {
      shape: [2 * d],
      init: { kind: 'values', values: [...new Array<number>(d).fill(0), ...new Array<number>(d).fill(SOFTPLUS_INVERSE_OF_ONE)] },
    },
  });
  return specs;
}

export const flowDimsOf = (s: SsmSettings) => ({ dim: s.stateSize, ctxDim: s.stateSize, hidden: s.flowHidden });

/** All parameters, including both flows under `gen/` and `inf/`. */
export function ssmParamSpecs(s: SsmSettings): ParamSpecs {
  validateSsmSettings(s);
  return {
    ...ssmCoreParamSpecs(s),
    ...prefixSpecs('gen/', flowParamSpecs(s.generativeFlow, flowDimsOf(s))),
    ...prefixSpecs('inf/', flowParamSpecs(s.inferenceFlow, flowDimsOf(s))),
  };
}

/** Number of trainable scalars for these settings (shown before training). */
export function ssmParameterCount(s: SsmSettings): number {
  return countParams(ssmParamSpecs(s));
}
