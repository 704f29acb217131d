/**
 * Debian's Chromium driven by playwright-core, with a fresh profile and no network chatter.
 */
import { chromium, type BrowserContext } from 'playwright-core';
import { existsSync, mkdtempSync } from 'node:fs';
import { join } from 'node:path';

export const CHROMIUM = process.env.QPOINT_CHROMIUM ?? '/usr/bin/chromium';

export async function launchBrowser(profileParent: string): Promise<BrowserContext> {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`Chromium not found at ${CHROMIUM}: apt-get install -y chromium (see scripts/workbench/apt-packages.txt)`);
  }
  const profile = mkdtempSync(join(profileParent, 'chromium-'));
  return chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1400, height: 900 },
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync',
      '--disable-dev-shm-usage'],
  });
}
