import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../../api/config';

function problemsOf(env: Record<string, string>): string[] {
  try {
    loadConfig(env);
  } catch (error) {
    if (error instanceof ConfigError) return error.problems;
    throw error;
  }
  return [];
}

describe('configuration', () => {
  it('starts on the embedded defaults with nothing set', () => {
    const config = loadConfig({});
    expect(config.PORT).toBe(3000);
    expect(config.appOrigin).toBe('http://localhost:3000');
    expect(config.useFakeGithub).toBe(true);
    expect(config.DATABASE_URL).toBeUndefined();
  });

  it('names the variable and the value when one is wrong', () => {
    const problems = problemsOf({ PORT: 'eighty' });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^PORT: .*"eighty"/);
  });

  it('refuses half a GitHub client configuration', () => {
    expect(problemsOf({ GITHUB_CLIENT_ID: 'abc' })[0]).toMatch(/^GITHUB_CLIENT_SECRET:/);
  });

  it('refuses production without a real session secret and a public origin', () => {
    const problems = problemsOf({ NODE_ENV: 'production', SESSION_SECRET: 'short' });
    expect(problems.some((p) => p.startsWith('SESSION_SECRET:'))).toBe(true);
    expect(problems.some((p) => p.startsWith('APP_ORIGIN:'))).toBe(true);
  });

  it('uses the real provider when both GitHub variables are set', () => {
    const config = loadConfig({ GITHUB_CLIENT_ID: 'id', GITHUB_CLIENT_SECRET: 'secret' });
    expect(config.useFakeGithub).toBe(false);
  });

  it('refuses a malformed database URL and an unknown boolean spelling', () => {
    expect(problemsOf({ DATABASE_URL: 'not a url' })[0]).toMatch(/^DATABASE_URL:/);
    expect(problemsOf({ SEED_DEMO: 'maybe' })[0]).toMatch(/^SEED_DEMO:/);
  });
});
