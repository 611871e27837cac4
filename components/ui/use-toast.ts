"use client";

import { createContext, useContext } from "react";

export type ToastTone = "neutral" | "ok" | "warn" | "danger";

export type ToastOptions = {
  tone?: ToastTone;
  /** How long the message stays; errors stay until dismissed when this is null. */
  durationMs?: number | null;
};

export type ToastApi = {
  /** Shows a short message and announces it politely; returns its id. */
  notify: (message: string, options?: ToastOptions) => string;
  dismiss: (id: string) => void;
};

export const ToastContext = createContext<ToastApi | null>(null);

/** The toast API of the nearest ToastProvider. */
export function useToast(): ToastApi {
  const api = useContext(ToastContext);
  if (!api) throw new Error("useToast needs a <ToastProvider> above it in the tree.");
  return api;
}
