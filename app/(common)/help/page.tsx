import { requirePageUser } from '@/lib/auth/session';
import { CAUTIONS } from '@/lib/cautions';

export const metadata = { title: 'Help and safety' };

export default async function HelpPage() {
  await requirePageUser();
  return (
    <div className="max-w-3xl space-y-6">
      <h1>Help and safety</h1>
      <section aria-labelledby="how" className="card space-y-2">
        <h2 id="how">How Fieldmark works</h2>
        <ol className="list-decimal space-y-1 pl-5 text-sm">
          <li>A technician records a collection (one ejaculate) with its semen parameters.</li>
          <li>Field images of the smear or wet mount are uploaded to the collection.</li>
          <li>The first read marks every sperm cell on the images with its class until the target count is reached.</li>
          <li>A second reader scores the same images blind; disagreements are listed and settled.</li>
          <li>A veterinarian reviews and signs the morphology report, which clients can then see.</li>
        </ol>
      </section>
      <section aria-labelledby="safety" className="card space-y-3">
        <h2 id="safety">Safety and responsibility</h2>
        <p className="text-sm text-ink-soft">
          These are general cautions. Follow your own institution’s procedures, local regulations and the safety data
          sheets of the products you use.
        </p>
        <dl className="space-y-3 text-sm">
          {CAUTIONS.map((c) => (
            <div key={c.title}>
              <dt className="font-medium">{c.title}</dt>
              <dd className="text-ink-soft">{c.text}</dd>
            </div>
          ))}
        </dl>
      </section>
    </div>
  );
}
