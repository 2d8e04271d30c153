import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../config.ts'

export const APP_VERSION: string = JSON.parse(readFileSync(join(PROJECT_ROOT, 'package.json'), 'utf8')).version
