/**
 * The estimation engine's runtime (not pure: worker threads): fitPanelParallel and the pool it
 * runs replications on. Pure numerics live in lib/stats.
 */
export { fitPanelParallel, type ParallelOptions } from './fit-panel-parallel';
export { defaultThreads, EngineAbortError, EnginePool, MAX_THREADS } from './pool';
export { splitRange, type EngineTask, type EngineTaskResult } from './tasks';
export { factorCorrelationMatrixParallel, type PairsRunOptions } from './pairs-parallel';
export { portfolioBlocks, type PortfolioBlocks, type PortfolioPanel, type PortfolioRequest } from './portfolio';
