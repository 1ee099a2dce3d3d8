import { describe, it, expect } from 'vitest';
describe('toolchain', () => { it('adds', () => { expect(1 + 1).toBe(2); }); });
