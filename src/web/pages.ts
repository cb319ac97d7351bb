import { projectPath } from '../paths.js';
import { readdirSync, readFileSync } from 'node:fs';
import Handlebars from 'handlebars';
import type { PageModule } from './assets.js';

/** A screen of the consult UI: its URL, template, client module and place in the top bar. */
export interface PageDef {
  url: string;
  template: string;
  title: string;
  module: PageModule;
  nav: 'caseload' | 'diary' | 'tables' | 'settings' | null;
  /** Answers without a session (only the sign-in screen). */
  public?: boolean;
}

/** The screens. Names are the product's own: see docs/web-ui.md. */
export const PAGES: readonly PageDef[] = [
  {
    url: '/signin',
    template: 'signin',
    title: 'Sign in',
    module: 'signin',
    nav: null,
    public: true,
  },
  {
    url: '/patients',
    template: 'patients',
    title: 'Caseload',
    module: 'patients',
    nav: 'caseload',
  },
  {
    url: '/patients/:id',
    template: 'patient',
    title: 'Patient record',
    module: 'patient',
    nav: 'caseload',
  },
  {
    url: '/plans/:id',
    template: 'builder',
    title: 'Plate ledger',
    module: 'builder',
    nav: 'caseload',
  },
  {
    url: '/plans/:id/preview',
    template: 'handout',
    title: 'Take-home sheet',
    module: 'handout',
    nav: 'caseload',
  },
  { url: '/diary', template: 'diary', title: 'Diary sift', module: 'diary', nav: 'diary' },
  { url: '/imports', template: 'imports', title: 'Food tables', module: 'imports', nav: 'tables' },
  {
    url: '/settings',
    template: 'settings',
    title: 'Clinic settings',
    module: 'settings',
    nav: 'settings',
  },
];

const TEMPLATE_DIR = `${projectPath('templates', 'web')}/`;

export type PageRenderer = (page: PageDef, params: Record<string, string>) => string;

/**
 * Compiles the layout, partials and page templates once (strict: a missing field is an error,
 * not an empty string) and returns a renderer. Handlebars escapes every value.
 */
export function compilePages(): PageRenderer {
  const hbs = Handlebars.create();
  for (const file of readdirSync(`${TEMPLATE_DIR}partials`)) {
    if (!file.endsWith('.hbs')) continue;
    hbs.registerPartial(file.slice(0, -4), readFileSync(`${TEMPLATE_DIR}partials/${file}`, 'utf8'));
  }
  hbs.registerHelper('eq', (a: unknown, b: unknown) => a === b);
  const layout = hbs.compile(readFileSync(`${TEMPLATE_DIR}layout.hbs`, 'utf8'), { strict: true });
  const bodies = new Map<string, HandlebarsTemplateDelegate>();
  for (const page of PAGES) {
    if (bodies.has(page.template)) continue;
    const text = readFileSync(`${TEMPLATE_DIR}pages/${page.template}.hbs`, 'utf8');
    bodies.set(page.template, hbs.compile(text, { strict: true }));
  }
  return (page, params) => {
    const body = bodies.get(page.template);
    if (!body) throw new Error(`no template ${page.template}`);
    const data = { page, params };
    return layout({
      title: page.title,
      module: page.module,
      nav: page.nav ?? '',
      signedInChrome: !page.public,
      params: JSON.stringify(params),
      body: new hbs.SafeString(body(data)),
    });
  };
}
