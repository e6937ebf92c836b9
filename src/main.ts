#!/usr/bin/env node
import { main } from './cli/main.js';
main();
