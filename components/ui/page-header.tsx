export type PageHeaderProps = {
  title: string;
  lead?: string;
  actions?: React.ReactNode;
  /** Leave the lead out below the md breakpoint, where a work page's first screen is for its next action. */
  leadFromTablet?: boolean;
};

export function PageHeader({ title, lead, actions, leadFromTablet = false }: PageHeaderProps) {
  return (
    <header className="flex flex-wrap items-end justify-between gap-4 border-b border-soot-200 bg-white px-4 md:px-8 pb-5 pt-7">
      <div>
        <h1 className="font-display text-2xl font-semibold tracking-tight text-soot-900">{title}</h1>
        {lead ? <p className={`mt-1 max-w-3xl text-sm text-soot-500 ${leadFromTablet ? "max-md:hidden" : ""}`}>{lead}</p> : null}
      </div>
      {actions ? <div className="flex flex-wrap items-center gap-2">{actions}</div> : null}
    </header>
  );
}
