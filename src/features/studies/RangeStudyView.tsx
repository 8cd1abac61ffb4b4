/**
 * The study page of a range study: the range of gap estimates across its methods (chart, caution,
 * per-method table), with the same actions as a study of one method where they apply (download,
 * draft an exhibit, duplicate, delete); its owner changes its methods (RangeMethodsForm).
 */
import { useQuery } from '@tanstack/react-query';
import { Link, useNavigate } from 'react-router-dom';
import { ACCESS, allows } from '@schemas/access';
import type { RangeResult } from '@schemas/analyses';
import { ErrorNote, PageHeader, Progress } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { RangeResultView } from '@/features/analyses/RangeResultView';
import { API, api } from '@/lib/api';
import { useStudyAction, type Study } from './api';
import { RangeMethodsForm } from './RangeMethodsForm';

export function RangeStudyView({ study }: { study: Study }) {
  const me = useMe();
  const navigate = useNavigate();
  const action = useStudyAction();
  const result = useQuery({ queryKey: ['study-result', study.id, study.updatedAt], queryFn: () => api<RangeResult & { kind: 'range' }>(`/studies/${study.id}/result`) });
  const isOwner = study.owner.id === me.data?.id;
  return (
    <>
      <PageHeader
        title={study.title}
        kicker="Range study"
        actions={
          <>
            <a className="btn-quiet" href={`${API}/studies/${study.id}/export?format=csv`} download aria-label="Download the range as CSV">
              CSV
            </a>
            <a className="btn-quiet" href={`${API}/studies/${study.id}/export?format=xlsx`} download aria-label="Download the range as XLSX">
              XLSX
            </a>
            {allows(ACCESS.exhibitsDraft, me.data?.roles) && (
              <Link className="btn" to={`/exhibits/new?studyId=${study.id}&title=${encodeURIComponent(study.title)}`}>
                Draft an exhibit
              </Link>
            )}
            {allows(ACCESS.studiesWrite, me.data?.roles) && (
              <button className="btn-quiet" onClick={() => action.mutate({ id: study.id, action: 'duplicate' }, { onSuccess: (s) => s && navigate(`/studies/${s.id}`) })}>
                Duplicate
              </button>
            )}
            {isOwner && allows(ACCESS.studiesWrite, me.data?.roles) && (
              <button className="btn-danger" onClick={() => confirm('Delete this study? Exhibits already submitted keep their own frozen copy.') && action.mutate({ id: study.id, action: 'delete' }, { onSuccess: () => navigate('/studies') })}>
                Delete
              </button>
            )}
          </>
        }
      >
        The range of gap estimates across {study.methods?.length ?? 0} methods on {study.series.code} ({study.vintage === 'latest' ? 'latest vintage, follows loads' : `vintage ${study.vintage}`}). Owned by {study.owner.name}
        {!isOwner && ' — duplicate it to change it'}.
      </PageHeader>
      <ErrorNote error={action.error ?? result.error} />
      {study.notes && <p className="mb-3 whitespace-pre-line text-sm">{study.notes}</p>}
      {result.isPending && <Progress value={null} label="Decomposing with each method" />}
      {result.data && <RangeResultView r={result.data} code={study.series.code} />}
      {isOwner && allows(ACCESS.studiesWrite, me.data?.roles) && (
        <div className="mt-4">
          <RangeMethodsForm key={study.updatedAt} study={study} />
        </div>
      )}
    </>
  );
}
