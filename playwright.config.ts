import { defineConfig } from '@playwright/test';

// Debian's Chromium, never a downloaded browser. Flags: no sandbox (we run as root in CI),
// no GPU (Veil must run without one), no background traffic on our closed network.
export const CHROMIUM_ARGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
  '--disable-component-update', '--disable-sync',
];

export default defineConfig({
  testDir: 'test/e2e',
  globalSetup: './test/e2e/global-setup.ts',
  workers: 1,
  timeout: 60_000,
  reporter: [['list']],
  outputDir: 'test-results',
  use: {
    browserName: 'chromium',
    viewport: { width: 1400, height: 860 },
    launchOptions: { executablePath: process.env.VEIL_CHROMIUM ?? '/usr/bin/chromium', args: CHROMIUM_ARGS },
  },
});
