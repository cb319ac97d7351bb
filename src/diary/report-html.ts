import { projectPath } from '../paths.js';
import { readFileSync } from 'node:fs';
import Handlebars from 'handlebars';
import type { DiaryReportView } from './report-view.js';

let compiled: HandlebarsTemplateDelegate<DiaryReportView> | undefined;

/** The audit as a printable HTML page (Handlebars escapes every diary text). */
export function renderDiaryReportHtml(view: DiaryReportView): string {
  if (!compiled) {
    const hbs = Handlebars.create();
    const source = readFileSync(projectPath('templates', 'diary', 'audit.hbs'), 'utf8');
    compiled = hbs.compile<DiaryReportView>(source, { strict: true });
  }
  return compiled(view);
}
