import { ingredientsCommands } from '../../additives/ingredients.command.js';
import { userCommands } from '../../auth/users.command.js';
import { dbBackup, dbRestore } from '../../backup/backup.command.js';
import { patientCommands } from '../../patients/patients.command.js';
import { planCommands } from '../../plans/plans.command.js';
import { planBalance } from '../../balance/balance.command.js';
import { diaryCommands } from '../../diary/diary.command.js';
import { handoutCommands } from '../../handouts/handouts.command.js';
import type { Command } from '../command.js';
import { dbMigrate, sources } from './db.js';
import { foodsSearch, foodsShow } from './foods.js';
import { importCommand } from './import.js';
import { serveCommand } from './serve.js';

/** Every CLI command; each area adds its own here. */
export const commands: Command[] = [serveCommand, dbMigrate, sources, foodsSearch, foodsShow];
commands.push(...userCommands, dbBackup, dbRestore);
commands.push(importCommand);
commands.push(...ingredientsCommands);
commands.push(...planCommands, ...patientCommands);
commands.push(planBalance);
commands.push(...diaryCommands);
commands.push(...handoutCommands);
