/**
 * Vitest global set-up: starts the real services once for the whole run and hands their
 * addresses to the tests through `inject()`; removes them afterwards.
 */
import type { TestProject } from 'vitest/node';
import { startTestStack, type TestStackInfo } from './support/test-stack.ts';

declare module 'vitest' {
  export interface ProvidedContext {
    stack: TestStackInfo;
  }
}

export default async function setup(project: TestProject) {
  const stack = await startTestStack();
  project.provide('stack', {
    databaseUrl: stack.databaseUrl,
    baseUrl: stack.baseUrl,
    mqttPort: stack.mqttPort,
    smtpUrl: stack.smtpUrl,
    pgBaseDir: stack.pgBaseDir,
  });
  return async () => {
    await stack.stop();
  };
}
