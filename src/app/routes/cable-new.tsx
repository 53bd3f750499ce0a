import { useNavigate, useSearchParams } from 'react-router-dom';
import { CONSTRUCTIONS, type CableTypeInput, type Construction } from '../../../shared/schemas/cables';
import { Card, PageHeader } from '../../components/ui/card';
import { useSession } from '../../features/auth/use-session';
import { useCreateCable } from '../../features/cables/api/save-cable';
import { CableForm } from '../../features/cables/components/cable-form';
import { paths } from '../paths';

/** Values handed over from the calculator in the query string. */
function prefillFrom(params: URLSearchParams): Partial<CableTypeInput> | undefined {
  const vf = Number(params.get('vf'));
  if (!params.get('vf') || !Number.isFinite(vf)) return undefined;
  const z0 = Number(params.get('z0Ohm'));
  const construction = params.get('construction') as Construction | null;
  return {
    vf,
    ...(params.get('z0Ohm') && Number.isFinite(z0) ? { z0Ohm: z0 } : {}),
    ...(construction && CONSTRUCTIONS.includes(construction) ? { construction } : {}),
    vfSource: 'calculated',
    vfReference: params.get('vfReference') ?? '',
  };
}

export function CableNewPage() {
  const { unit } = useSession();
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const create = useCreateCable();
  return (
    <>
      <PageHeader title="New cable type" subtitle="Name it in our own words, give the VF with its tolerance and say where it comes from." />
      <Card>
        <CableForm
          unit={unit}
          prefill={prefillFrom(params)}
          pending={create.isPending}
          error={create.error}
          submitLabel="Add to the library"
          onSubmit={(values) => create.mutate(values, { onSuccess: (c) => navigate(paths.cable.to(c.id)) })}
          onCancel={() => navigate(paths.cables.to())}
        />
      </Card>
    </>
  );
}
export default CableNewPage;
