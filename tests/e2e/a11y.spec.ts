/**
 * Accessibility (issue 8): every main screen at tablet size (1024×768) for the role that uses it.
 * 1. axe-core (WCAG 2.0/2.1 A and AA rules) finds no serious or critical violation [pub: axe-core rules, WCAG 2.1].
 * 2. Keyboard: Tab reaches every visible, enabled control of the screen, the focused element
 *    changes on each press (date inputs take one press per part), and each focused control shows a
 *    focus indicator: an outline, a box-shadow ring, or a border or background other than its
 *    unfocused one [pub: WCAG 2.1 SC 2.1.1, 2.4.7].
 *
 * Run through the e2e lock: flock /tmp/ebbcast-e2e.lock node scripts/e2e.mjs tests/e2e/a11y.spec.ts
 */
import { test, expect, type Page } from '@playwright/test';
import AxeBuilder from '@axe-core/playwright';
import { DEMO_OUTBREAK, signIn } from './helpers';

const O = `outbreak=${DEMO_OUTBREAK}`;

/** Screen → who uses it. Public screens are scanned signed out. */
const SCREENS: Array<{ path: string; as: string | null }> = [
  { path: '/', as: null },
  { path: '/signin', as: null },
  { path: '/forgot', as: null },
  { path: '/offline', as: null },
  { path: '/field', as: 'field' },
  { path: `/entry?${O}`, as: 'field' },
  { path: `/tallies?${O}`, as: 'field' },
  { path: `/scenarios?${O}`, as: 'field' },
  { path: `/forecast?${O}`, as: 'field' },
  { path: '/sync', as: 'field' },
  { path: `/overview?${O}`, as: 'coordinator' },
  { path: `/merge?${O}`, as: 'coordinator' },
  { path: `/sitrep?${O}`, as: 'coordinator' },
  { path: '/manage', as: 'coordinator' },
  { path: `/sheets?${O}`, as: 'coordinator' },
  { path: '/ledger', as: 'supervisor' },
  { path: '/admin', as: 'admin' },
  { path: '/mail', as: 'admin' },
];

async function open(page: Page, screen: { path: string; as: string | null }) {
  if (screen.as) await signIn(page, `${screen.as}@marrowbend.example`);
  await page.goto(screen.path);
  await page.waitForLoadState('networkidle').catch(() => undefined);
  // Client shells read Dexie and may render after load; give them a moment to settle.
  await page.waitForTimeout(800);
}

/** The visible, enabled controls a keyboard user must be able to reach, as stable descriptions. */
async function tabbables(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const sel = 'a[href], button, input, select, textarea, summary, [tabindex]:not([tabindex="-1"]), [contenteditable="true"]';
    const out: string[] = [];
    document.querySelectorAll<HTMLElement>(sel).forEach((el, i) => {
      const s = getComputedStyle(el);
      const r = el.getBoundingClientRect();
      if ((el as HTMLButtonElement).disabled || el.tabIndex < 0 || s.visibility === 'hidden' || s.display === 'none' || r.width === 0 || r.height === 0) return;
      if (el.closest('[inert], [aria-hidden="true"]')) return;
      if (el instanceof HTMLInputElement && el.type === 'hidden') return;
      // Radio groups take one tab stop.
      if (el instanceof HTMLInputElement && el.type === 'radio' && !el.checked && document.querySelector(`input[type=radio][name="${el.name}"]:checked`)) return;
      el.dataset.a11yId = String(i);
      // Its look without focus, to tell a focus style that changes the border or background from none.
      el.dataset.a11yRest = `${s.borderColor}|${s.backgroundColor}`;
      out.push(String(i));
    });
    return out;
  });
}

interface Stop {
  id: string | null;
  desc: string;
  indicator: boolean;
  /** A date or time input: Tab moves between its parts before it leaves the control. */
  segmented: boolean;
}

/** Presses Tab until focus comes back round (or a bound), recording each stop and whether it shows focus. */
async function tabThrough(page: Page, bound: number): Promise<Stop[]> {
  await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
  const stops: Stop[] = [];
  for (let i = 0; i < bound; i++) {
    await page.keyboard.press('Tab');
    const stop = await page.evaluate(() => {
      const el = document.activeElement as HTMLElement | null;
      if (!el || el === document.body) return null;
      const focused = getComputedStyle(el);
      const ring = { outline: `${focused.outlineStyle} ${focused.outlineWidth} ${focused.outlineColor}`, shadow: focused.boxShadow, border: focused.borderColor, bg: focused.backgroundColor };
      // The same element's look without focus: blur, read, focus again (focus-visible comes back with the keyboard modality).
      const visible = focused.outlineStyle !== 'none' && parseFloat(focused.outlineWidth) > 0;
      const shadow = focused.boxShadow !== 'none' && focused.boxShadow !== '';
      const restyled = el.dataset.a11yRest !== undefined && el.dataset.a11yRest !== `${focused.borderColor}|${focused.backgroundColor}`;
      // Date and time inputs take one Tab per part (day, month, year); Chromium highlights the focused part.
      const segmented = el instanceof HTMLInputElement && /^(date|time|datetime-local|month|week)$/.test(el.type);
      const desc = `${el.tagName.toLowerCase()}${el.id ? '#' + el.id : ''} "${(el.getAttribute('aria-label') ?? el.textContent ?? '').trim().slice(0, 40)}"`;
      return { id: el.dataset.a11yId ?? null, desc, indicator: visible || shadow || restyled, segmented, ring };
    });
    if (!stop) continue;
    // Round once: stop when focus comes back to the first control (re-rendered elements lose their mark, so compare the description too).
    const first = stops[0];
    if (first && stops.length > 1 && first.desc === stop.desc && (first.id === stop.id || first.id === null || stop.id === null)) break;
    stops.push({ id: stop.id, desc: stop.desc, indicator: stop.indicator, segmented: stop.segmented });
  }
  return stops;
}

const report: string[] = [];

test.describe('accessibility of the main screens at 1024×768', () => {
  for (const screen of SCREENS) {
    test(`${screen.path} (${screen.as ?? 'signed out'})`, async ({ page }) => {
      await page.setViewportSize({ width: 1024, height: 768 });
      await open(page, screen);
      const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
      const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
      const lines = serious.map((v) => `${v.id} (${v.impact}): ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join(' | ')}`);
      const want = await tabbables(page);
      const stops = await tabThrough(page, want.length * 2 + 10);
      const reached = new Set(stops.map((s) => s.id).filter(Boolean));
      const unreached = want.filter((id) => !reached.has(id));
      const unreachedDesc = await page.evaluate((ids) => ids.map((id) => {
        const el = document.querySelector<HTMLElement>(`[data-a11y-id="${id}"]`);
        return el ? `${el.tagName.toLowerCase()} "${(el.getAttribute('aria-label') ?? el.textContent ?? '').trim().slice(0, 40)}"` : id;
      }), unreached);
      const noRing = stops.filter((s) => !s.indicator).map((s) => s.desc);
      // Each press moves focus: no stop repeats the one before it.
      const stuck = stops.filter((s, i) => i > 0 && !s.segmented && s.id === stops[i - 1]!.id && s.desc === stops[i - 1]!.desc).map((s) => s.desc);
      report.push(`${screen.path} as ${screen.as ?? 'signed out'}: axe ${results.violations.length} violations (${serious.length} serious/critical), ${results.passes.length} rules passed; ${want.length} controls, ${stops.length} tab stops, ${unreached.length} unreached, ${noRing.length} without a focus indicator${noRing.length ? ` (${noRing.join(', ')})` : ''}`);
      console.log(report.at(-1));
      expect(results.passes.length, 'axe ran its rules').toBeGreaterThan(10);
      expect(lines, `serious/critical axe violations on ${screen.path}`).toEqual([]);
      expect(stuck, 'focus moves on each Tab').toEqual([]);
      expect(unreachedDesc, `controls Tab never reaches on ${screen.path}`).toEqual([]);
      expect(noRing, `focused controls without a visible focus indicator on ${screen.path}`).toEqual([]);
    });
  }
});
