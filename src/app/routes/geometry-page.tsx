import { PageTitle } from '../../components/ui/page-state.tsx';
import { GeometryPlanner } from '../../features/geometry/components/geometry-planner.tsx';
import { TransmissionPredictor } from '../../features/geometry/components/transmission-predictor.tsx';

export default function GeometryPage() {
  return (
    <div className="space-y-10">
      <PageTitle>Grid geometry</PageTitle>
      <section aria-labelledby="planner-heading" className="space-y-4">
        <h2
          id="planner-heading"
          className="text-xl font-semibold text-lamina-950"
        >
          Focused-grid planner
        </h2>
        <p className="text-sm text-slate-600">
          How much primary a focused grid loses across the field at a given SID,
          offset and tilt, and the range of distances it is made for.
        </p>
        <GeometryPlanner />
      </section>
      <section aria-labelledby="prediction-heading" className="space-y-4">
        <h2
          id="prediction-heading"
          className="text-xl font-semibold text-lamina-950"
        >
          Predicted transmission
        </h2>
        <p className="text-sm text-slate-600">
          What a grid of this construction should transmit for a beam, and the
          figures that follow for an assumed scatter-to-primary ratio.
        </p>
        <TransmissionPredictor />
      </section>
    </div>
  );
}
