/**
 * Tells the corpora module which runs use a corpus, so a corpus with runs cannot be deleted by
 * accident (rule in server/modules/corpora/corpus-usage.ts). Registered once, when this module loads.
 */
import { registerCorpusUsageCheck } from '../corpora/corpus-usage';
import { RunRepository } from './run.repository';

registerCorpusUsageCheck((em, corpusId) => new RunRepository(em).usingCorpus(corpusId));
