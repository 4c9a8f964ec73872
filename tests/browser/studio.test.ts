import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { DEMO_USERS } from '@/lib/demo/accounts';

let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  page = await context.newPage();
  await page.goto(appUrl('/signin?callbackUrl=%2Fstudio%2Fdatasets'));
  await page.getByLabel('E-mail').fill(DEMO_USERS.member.email);
  await page.getByLabel('Password').fill(DEMO_USERS.member.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/studio\/datasets$/);
  await page.locator('h1').filter({ hasText: 'Datasets' }).waitFor();
});
afterAll(async () => {
  await browser?.close();
});

describe('the studio, as the club analyst', () => {
  it('a bad paste is refused with a message naming the column', async () => {
    await page.getByRole('tab', { name: 'Paste a table' }).click();
    await page.getByLabel('Table', { exact: true }).fill('speed,climb,speed\n1,2,3\n4,5,6\n');
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.getByRole('alert').filter({ hasText: 'Column 3 is named "speed", the same as column 1' }).waitFor();
    await screenshot(page, 'studio-upload-error');
  });

  it('uploads the sample ride logs and shows the column summary', async () => {
    await page.getByRole('tab', { name: 'CSV file' }).click();
    await page.getByTestId('csv-file').setInputFiles(path.resolve('public/samples/riverside-rides.csv'));
    await page.getByLabel(/^Name/).fill('Rides uploaded in the browser');
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.waitForURL(/\/studio\/datasets\/\d+$/);
    await expect(page.locator('h1').textContent()).resolves.toBe('Rides uploaded in the browser');
    const summary = await page.getByRole('table', { name: 'Column summary' }).textContent();
    expect(summary).toContain('avg_speed_kmh');
    expect(summary).toContain('410');
    await screenshot(page, 'studio-dataset');
  });

  it('fits with live progress, then shows the BIC chart and the scatter with ellipses', async () => {
    await page.getByLabel('Most components').fill('6');
    await page.getByLabel('Restarts').fill('3');
    await page.getByRole('button', { name: 'Fit 12 candidates' }).click();
    await page.waitForURL(/\/studio\/fits\/\d+$/);
    await page.getByTestId('fit-progress-text').filter({ hasText: /Candidate \d+ of 12|All 12 candidates fitted/ }).waitFor({ timeout: 60_000 });
    await page.getByTestId('criterion-chart').locator('svg').first().waitFor({ timeout: 90_000 });
    await page.getByTestId('cluster-scatter').locator('svg path').first().waitFor({ timeout: 30_000 });
    const ranks = await page.getByRole('table', { name: 'Candidates' }).locator('tbody tr').count();
    expect(ranks).toBe(12);
    // The ellipses are drawn as line paths: 2 per cluster, plus the point marks.
    const marks = await page.getByTestId('cluster-scatter').locator('svg path').count();
    expect(marks).toBeGreaterThan(8);
    await expect(page.getByTestId('certainty').textContent()).resolves.toMatch(/^\d+%$/);
    await screenshot(page, 'studio-fit-results');
  });

  it('choosing a runner-up needs a note; then the clusters are named and saved', async () => {
    await page.getByRole('table', { name: 'Candidates' }).locator('tbody tr').nth(1).getByRole('radio').check();
    await page.getByRole('button', { name: 'Keep and name clusters' }).click();
    await page.getByRole('alert').filter({ hasText: 'say in a note why you prefer it' }).waitFor();
    await page.getByRole('table', { name: 'Candidates' }).locator('tbody tr').first().getByRole('radio').check();
    await page.getByLabel('Model name').fill('Browser ride groups');
    await page.getByRole('button', { name: 'Keep and name clusters' }).click();
    await page.waitForURL(/\/studio\/models\/\d+$/);
    // Only the cluster editors: the review scatter's test id starts with "cluster-" too, and may have rendered by now.
    const clusters = await page.locator('[data-testid^="cluster-"]:not([data-testid="cluster-scatter"])').count();
    expect(clusters).toBeGreaterThanOrEqual(2);
    const names = ['Easy social', 'Steady tourers', 'Hill chasers', 'Fast pack', 'Long haul', 'Night riders'];
    for (let k = 0; k < clusters; k++) {
      await page.getByLabel(`Label of cluster ${k + 1}`).fill(names[k]);
      await page.getByTestId(`cluster-${k}`).getByLabel('One-line description').fill(`Group ${k + 1} of the browser test.`);
    }
    await page.getByRole('radiogroup', { name: 'Colour of cluster 1' }).getByRole('radio', { name: 'Heather' }).click();
    await page.getByRole('button', { name: 'Save names and fields' }).click();
    await page.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
    await page.reload();
    // The form's fields are filled when it hydrates (react-hook-form registers them on the client).
    await expect.poll(() => page.getByLabel('Label of cluster 1').inputValue()).toBe('Easy social');
    await page.getByTestId('cluster-scatter').locator('svg').first().waitFor({ timeout: 30_000 });
    const legend = await page.getByTestId('cluster-scatter').textContent();
    expect(legend).toContain('Easy social');
    await screenshot(page, 'studio-model-named');
    const download = await page.request.get(page.url().replace('/studio/models/', '/api/models/') + '/download');
    expect(download.status()).toBe(200);
    expect((await download.json()).format).toBe('partwise.mixture-model');
  });

  it('deleting a dataset asks for confirmation first', async () => {
    await page.goto(appUrl('/studio/datasets'));
    await page.getByRole('link', { name: 'Rides uploaded in the browser' }).click();
    await page.getByRole('button', { name: 'Delete dataset…' }).click();
    await page.getByRole('alertdialog').waitFor();
    await screenshot(page, 'studio-delete-confirm');
    await page.getByRole('button', { name: 'Yes, delete it' }).click();
    await page.waitForURL(/\/studio\/datasets$/);
    await expect(page.getByRole('link', { name: 'Rides uploaded in the browser' }).count()).resolves.toBe(0);
  });
});
