/**
 * CLI: `npm run --silent channels < request.json`.
 * Reads one channel request (JSON) from stdin and prints one JSON response on stdout (exit 0).
 * Invalid input (bad JSON or any EngineError) prints ONE line on stderr and exits 2; an
 * unexpected internal failure prints one line and exits 1. Request format: shared/engine/request.ts.
 */
import { computeChannels } from '../../shared/engine'
import { runEngineCli } from './engine-cli'

runEngineCli(computeChannels)
