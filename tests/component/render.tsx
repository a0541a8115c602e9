import { QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import type { ReactElement } from 'react';
import { createMemoryRouter, RouterProvider, type RouteObject } from 'react-router';
import { createQueryClient } from '../../src/lib/query-client';

/** Renders routes with the real providers at a path, as the app does. */
export function renderRoutes(routes: RouteObject[], path: string) {
  const queryClient = createQueryClient();
  const router = createMemoryRouter(routes, { initialEntries: [path] });
  return {
    queryClient,
    router,
    ...render(
      <QueryClientProvider client={queryClient}>
        <RouterProvider router={router} />
      </QueryClientProvider>,
    ),
  };
}

export function renderWithProviders(element: ReactElement, path = '/') {
  return renderRoutes([{ path: '*', element }], path);
}

/** Replaces fetch with answers by method and path; unknown requests fail the test loudly. */
export function mockApi(handlers: Record<string, (body: unknown) => { status: number; body?: unknown }>) {
  const calls: { method: string; path: string; body: unknown }[] = [];
  globalThis.fetch = async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = new URL(String(input), 'http://localhost');
    const method = init?.method ?? 'GET';
    const key = `${method} ${url.pathname}`;
    const body = typeof init?.body === 'string' ? JSON.parse(init.body) : undefined;
    calls.push({ method, path: url.pathname, body });
    const handler = handlers[key];
    if (!handler) throw new Error(`Unexpected request ${key}`);
    const answer = handler(body);
    return new Response(answer.body === undefined ? null : JSON.stringify(answer.body), {
      status: answer.status,
      headers: { 'content-type': 'application/json' },
    });
  };
  return calls;
}
