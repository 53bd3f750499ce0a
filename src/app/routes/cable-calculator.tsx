import { useNavigate } from 'react-router-dom';
import { PageHeader } from '../../components/ui/card';
import { useSession } from '../../features/auth/use-session';
import { CableCalculator } from '../../features/cables/components/calculator';
import { paths } from '../paths';

export function CableCalculatorPage() {
  const { unit, can } = useSession();
  const navigate = useNavigate();
  return (
    <>
      <PageHeader
        title="VF calculator"
        subtitle="Velocity factor and impedance from the dielectric, from L and C, or from the cable’s geometry — worked out as you type."
      />
      <CableCalculator
        unit={unit}
        onUse={
          can('cables:write')
            ? (entry) => {
                const q = new URLSearchParams();
                for (const [k, v] of Object.entries(entry)) if (v !== undefined) q.set(k, String(v));
                navigate(`${paths.cableNew.to()}?${q.toString()}`);
              }
            : undefined
        }
      />
    </>
  );
}
export default CableCalculatorPage;
