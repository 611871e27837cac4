"use client";
import { createAuthClient } from "better-auth/react";

// Same origin as the page, so no base URL: works on 127.0.0.1 and localhost alike.
export const authClient = createAuthClient();
