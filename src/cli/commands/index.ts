import type { Command } from '../command.js';

/**
 * Where each command lives, by its first word. A command's module (and everything it imports:
 * the database, PDF and HTTP code) is loaded only when that command runs; `--help` reads the
 * list `npm run build` writes (see manifest.ts), so it loads none of them.
 */
export interface CommandModule {
  /** First words of the commands the module defines. */
  firstWords: readonly string[];
  load(): Promise<Command[]>;
}

export const commandModules: readonly CommandModule[] = [
  { firstWords: ['serve'], load: async () => [(await import('./serve.js')).serveCommand] },
  {
    firstWords: ['db', 'sources'],
    load: async () => {
      const m = await import('./db.js');
      return [m.dbMigrate, m.sources];
    },
  },
  {
    firstWords: ['db'],
    load: async () => {
      const m = await import('../../backup/backup.command.js');
      return [m.dbBackup, m.dbRestore];
    },
  },
  {
    firstWords: ['foods'],
    load: async () => {
      const m = await import('./foods.js');
      return [m.foodsSearch, m.foodsShow];
    },
  },
  {
    firstWords: ['users'],
    load: async () => (await import('../../auth/users.command.js')).userCommands,
  },
  { firstWords: ['import'], load: async () => [(await import('./import.js')).importCommand] },
  {
    firstWords: ['ingredients'],
    load: async () => (await import('../../additives/ingredients.command.js')).ingredientsCommands,
  },
  {
    firstWords: ['plan'],
    load: async () => (await import('../../plans/plans.command.js')).planCommands,
  },
  {
    firstWords: ['patient'],
    load: async () => (await import('../../patients/patients.command.js')).patientCommands,
  },
  {
    firstWords: ['diary'],
    load: async () => (await import('../../diary/diary.command.js')).diaryCommands,
  },
  {
    firstWords: ['plan'],
    load: async () => (await import('../../handouts/handouts.command.js')).handoutCommands,
  },
  {
    firstWords: ['plan'],
    load: async () => [(await import('../../balance/balance.command.js')).planBalance],
  },
  {
    firstWords: ['labs'],
    load: async () => (await import('../../patients/labs.command.js')).labCommands,
  },
  {
    firstWords: ['plan'],
    load: async () => [(await import('../../plans/fhir-export.command.js')).planExportFhir],
  },
];

/** The commands whose first word is `word` (loads only their modules). */
export async function loadCommandsFor(word: string): Promise<Command[]> {
  const modules = commandModules.filter((m) => m.firstWords.includes(word));
  return (await Promise.all(modules.map((m) => m.load()))).flat();
}

/** Every command, in the order help lists them (loads every module). */
export async function loadAllCommands(): Promise<Command[]> {
  return (await Promise.all(commandModules.map((m) => m.load()))).flat();
}
