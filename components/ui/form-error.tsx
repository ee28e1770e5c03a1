export type FormErrorProps = { children: React.ReactNode; testId?: string; className?: string };

/** Why a form or an upload did not go through, read out as soon as it appears. */
export function FormError({ children, testId, className = "" }: FormErrorProps) {
  return (
    <p role="alert" className={`rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700 ${className}`} data-testid={testId}>
      {children}
    </p>
  );
}
