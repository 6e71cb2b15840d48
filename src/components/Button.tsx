import type { ButtonHTMLAttributes } from "react";
import { Link, type LinkProps } from "react-router-dom";

type Variant = "primary" | "secondary" | "ghost" | "danger";
const VARIANT: Record<Variant, string> = {
  primary: "bg-brand text-brand-ink border-brand hover:bg-brand-strong",
  secondary: "bg-surface text-ink border-line-strong hover:bg-sunken",
  ghost: "bg-transparent text-ink-muted border-transparent hover:bg-sunken hover:text-ink",
  danger: "bg-surface text-danger border-danger/40 hover:bg-danger-soft",
};
const SIZE = { sm: "px-2.5 py-1 text-caption", md: "px-3.5 py-1.5 text-body" };

export function buttonClass(variant: Variant = "secondary", size: "sm" | "md" = "md") {
  return `inline-flex items-center justify-center gap-1.5 rounded-md border font-medium transition-colors disabled:cursor-not-allowed disabled:opacity-50 ${VARIANT[variant]} ${SIZE[size]}`;
}

export function Button({ variant = "secondary", size = "md", className = "", type = "button", ...rest }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant; size?: "sm" | "md" }) {
  return <button type={type} className={`${buttonClass(variant, size)} ${className}`} {...rest} />;
}

export function ButtonLink({ variant = "secondary", size = "md", className = "", ...rest }: LinkProps & { variant?: Variant; size?: "sm" | "md" }) {
  return <Link className={`${buttonClass(variant, size)} no-underline ${className}`} {...rest} />;
}
