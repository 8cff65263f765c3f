/**
 * Registers every job handler. Add one import per handler file (each file calls
 * registerJobHandler for its kind, declared in lib/jobs/kinds).
 */
import '../registry';
import './convert-loans';
import './fit';
