import { createAuthClient } from 'better-auth/react';

// Same origin as the page, so no baseURL: it works on any host and port.
export const authClient = createAuthClient();
