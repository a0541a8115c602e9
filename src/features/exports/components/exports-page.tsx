import { useCurrentFederation } from '../../../lib/use-federation';
import { Caution } from '../../../components/caution';
import { usePageTitle } from '../../../lib/page-title';
import { QueryState } from '../../../components/query-state';
import { useExportOptions } from '../api/get-export-options';
import { ExportForm } from './export-form';
import { ExportSettingsPanel } from './export-settings-panel';
import { MyExports } from './my-exports';

/** Anonymised research export: build, download, and (leads) set k and studies. */
export function ExportsPage() {
  const { federation, role } = useCurrentFederation();
  const options = useExportOptions(federation.slug);
  const isLead = role === 'lead';
  usePageTitle('Research export');
  return (
    <div className="space-y-6">
      <div>
        <h1>Research export</h1>
        <p className="text-muted">Panel decisions for studying whether classification is consistent: the decisions, not the people.</p>
      </div>
      <Caution />
      <div className={isLead ? 'grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]' : 'max-w-3xl'}>
        <QueryState query={options} what="The export options">
          {(data) => <ExportForm federation={federation.slug} options={data} isLead={isLead} />}
        </QueryState>
        {isLead ? <ExportSettingsPanel federation={federation.slug} /> : null}
      </div>
      <MyExports federation={federation.slug} />
    </div>
  );
}
