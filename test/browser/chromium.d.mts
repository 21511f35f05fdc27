import type { BrowserContext, Page } from 'playwright-core';

export const CHROMIUM: string;
export const ARGS: string[];
export const PAGE_URL: string;
export function chromiumAvailable(): boolean;
export function launch(viewport?: { width?: number; height?: number }): Promise<{ context: BrowserContext; close(): Promise<void> }>;
export function openPage(context: BrowserContext, html: string): Promise<{ page: Page; outside: string[]; errors: string[] }>;
