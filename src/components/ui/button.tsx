import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'danger' | 'ghost';
const VARIANTS: Record<Variant, string> = {
  primary: 'bg-copper text-white hover:bg-copper-dark disabled:bg-mist',
  secondary: 'bg-card text-ink border border-rule hover:border-ink-soft disabled:text-mist',
  danger: 'bg-danger text-white hover:brightness-90 disabled:bg-mist',
  ghost: 'text-ink-soft hover:bg-rule/40',
};

/** Buttons are at least 44 px tall: technicians press them with gloves on. */
export function Button({
  variant = 'primary',
  className = '',
  type = 'button',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      type={type}
      className={`inline-flex min-h-11 items-center justify-center gap-2 rounded-md px-4 py-2 text-sm font-semibold transition-colors disabled:cursor-not-allowed ${VARIANTS[variant]} ${className}`}
      {...props}
    />
  );
}
