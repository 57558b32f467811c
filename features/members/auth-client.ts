"use client";

import { createAuthClient } from "better-auth/react";

// Talks to better-auth's routes under /api/auth on the same origin.
export const authClient = createAuthClient();
