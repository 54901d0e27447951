import { expect, test, type Page } from "@playwright/test";
import { monthOf } from "@/shared/month";
import { signIn } from "./helpers";

// A technician records a failing air test with its certificate: the critical alarm shows on the board; a passing retest
// clears it; the manager's report for the month counts both. One role at a time.

const UNIT = "MB-1 Main"; // Marrow Bay Fire Station, EN 12021 in the demo
const PDF = Buffer.from("%PDF-1.4\n1 0 obj << /Type /Catalog /Pages 2 0 R >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n");

async function fillTest(page: Page, certificateNo: string, coPpm: string, file: { name: string; mimeType: string; buffer: Buffer }) {
  const form = page.getByRole("form", { name: "Record an air test" });
  await form.getByRole("combobox", { name: "Compressor" }).selectOption({ label: `${UNIT} (Marrow Bay Fire Station)` });
  await form.getByLabel("Sample point").fill("Fill panel whip 2");
  await form.getByLabel("Fill pressure").fill("300");
  await form.getByLabel("Laboratory", { exact: true }).fill("Brightwater Gas Analysis");
  await form.getByLabel("Certificate number").fill(certificateNo);
  await form.getByLabel("Oxygen").fill("20.9");
  await form.getByLabel("Carbon dioxide").fill("410");
  await form.getByLabel("Carbon monoxide").fill(coPpm);
  await form.getByLabel("Oil (mist and vapour)").fill("0.05");
  await form.getByLabel("Water", { exact: true }).fill("20");
  await form.getByLabel(/Laboratory certificate/).setInputFiles(file);
  // Enter in a text field submits the form (implicit submission), as a person on a keyboard would.
  await form.getByLabel("Certificate number").press("Enter");
  return form;
}

async function boardCriticalCount(page: Page): Promise<number> {
  await page.goto("/board");
  const tile = page.getByTestId("compressor-tile").filter({ hasText: UNIT });
  await expect(tile).toBeVisible();
  const critical = tile.locator('[data-priority="critical"]');
  return (await critical.count()) ? Number(await critical.first().getAttribute("data-count")) : 0;
}

test.describe.configure({ mode: "serial" });
// This machine is shared and slow while others build: the paths below take several page loads each.
test.setTimeout(120_000);

test("technician: a certificate that is not a PDF or image is refused at its field, nothing saved", async ({ page }) => {
  await signIn(page, "technician");
  await page.goto("/air-quality");
  const form = await fillTest(page, "E2E-TXT", "1", { name: "cert.pdf", mimeType: "application/pdf", buffer: Buffer.from("plain text pretending\n".repeat(40)) });
  await expect(form.locator("[data-field-error]").filter({ hasText: /Only photos .* PDF documents/ })).toBeVisible();
  await page.reload();
  await expect(page.locator('[data-certificate="E2E-TXT"]')).toHaveCount(0);
});

test("technician: a failing test raises the critical alarm on the board; a passing retest clears it", async ({ page }) => {
  await signIn(page, "technician");
  const before = await boardCriticalCount(page);
  await page.goto("/air-quality");
  const form = await fillTest(page, "E2E-FAIL", "12", { name: "certificate.pdf", mimeType: "application/pdf", buffer: PDF });
  await expect(form.getByRole("status")).toContainText("FAILED");
  const record = page.locator('[data-certificate="E2E-FAIL"]');
  await expect(record.locator('[data-analyte="co"]')).toHaveAttribute("data-result", "fail");
  await expect(record.getByRole("link", { name: /Certificate/ })).toBeVisible();
  await expect(page.getByTestId("air-quality-row").filter({ hasText: UNIT })).toContainText("Do not use air from this compressor");

  await expect.poll(() => boardCriticalCount(page), { timeout: 30_000 }).toBe(before + 1);
  await page.goto("/alarms");
  await expect(page.getByTestId("alarm-row").filter({ hasText: /Air test failed/ }).first()).toBeVisible();

  await page.goto("/air-quality");
  const retest = await fillTest(page, "E2E-PASS", "1", { name: "retest.pdf", mimeType: "application/pdf", buffer: PDF });
  await expect(retest.getByRole("status")).toContainText("passed");
  await expect.poll(() => boardCriticalCount(page), { timeout: 30_000 }).toBe(before);
});

test("manager: the month's report shows the failed and the passed test", async ({ page }) => {
  await signIn(page, "manager");
  const month = monthOf(Date.now(), "Europe/London");
  await page.goto(`/reports?month=${month}`);
  const row = page.getByTestId("report-air-quality").locator('tr[data-site="Marrow Bay Fire Station"]');
  await expect(row).toBeVisible();
  expect(Number(await row.getByTestId("aq-failed").textContent())).toBeGreaterThanOrEqual(1);
  expect(Number(await row.getByTestId("aq-passed").textContent())).toBeGreaterThanOrEqual(1);
});
