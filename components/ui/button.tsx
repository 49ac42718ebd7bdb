import type { ButtonHTMLAttributes } from 'react';

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: 'primary' | 'secondary' | 'danger' | 'quiet';
  size?: 'md' | 'lg';
}

const VARIANT: Record<NonNullable<ButtonProps['variant']>, string> = {
  primary: 'bg-accent text-white hover:bg-accent-dark border-accent',
  secondary: 'bg-panel text-ink border-ink/30 hover:border-ink',
  danger: 'bg-warning text-white border-warning hover:brightness-95',
  quiet: 'bg-transparent text-accent border-transparent hover:underline',
};

/** A touch-sized button (at least 44 px high). */
export function Button({ variant = 'primary', size = 'md', className = '', type = 'button', ...rest }: ButtonProps) {
  const sizing = size === 'lg' ? 'min-h-14 px-6 text-lg' : 'min-h-touch px-4';
  return (
    <button
      type={type}
      className={`inline-flex items-center justify-center gap-2 rounded-lg border-2 font-bold disabled:cursor-not-allowed disabled:opacity-50 ${sizing} ${VARIANT[variant]} ${className}`}
      {...rest}
    />
  );
}
