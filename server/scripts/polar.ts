/**
 * CLI: `npm run --silent polar < request.json`.
 * Reads one polar-pattern request (JSON) from stdin and prints `{ harmonics, points, … }` on stdout
 * (exit 0). Invalid input (bad JSON or any EngineError) prints ONE line on stderr and exits 2; an
 * unexpected internal failure prints one line and exits 1. Request format: shared/engine/polar.ts;
 * geometry: docs/physics.md §6.
 */
import { computePolar } from '../../shared/engine'
import { runEngineCli } from './engine-cli'

runEngineCli(computePolar)
