/**
 * Imports every job-kind declaration so that the registry is complete wherever jobs are enqueued
 * or run. Add one import per kind.
 */
import '../kinds';
import './convert-loans';
import './fit';
