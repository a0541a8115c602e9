import { useEffect } from 'react';
import { Link, useLocation } from 'react-router';
import { Caution } from '../components/caution';
import { useCurrentFederation } from '../lib/use-federation';
import { usePageTitle } from '../lib/page-title';

/**
 * How to read the figures and the calibration flags, inside the app (the repository's
 * docs/dashboards.md is for developers; a lead cannot open it). Each section has an id so a page
 * can link to it: help#flags, help#filters.
 */
export function HelpPage() {
  const { role } = useCurrentFederation();
  usePageTitle('Help');
  const { hash } = useLocation();
  // A link to a section (help#flags) opens at it.
  useEffect(() => {
    if (hash) document.getElementById(decodeURIComponent(hash.slice(1)))?.scrollIntoView();
  }, [hash]);
  return (
    <article className="max-w-3xl space-y-6">
      <header className="space-y-1">
        <h1>How to read Panelwise</h1>
        <p className="text-muted">What the figures mean, how the filters work and, for leads, how calibration flags are raised.</p>
      </header>
      <Caution />

      <section id="filters" aria-labelledby="help-filters" className="card space-y-2">
        <h2 id="help-filters">Filters</h2>
        <p>
          Season (1 July to 30 June), dates, event, competition category and assessment kind narrow every figure on a page. They are kept in
          the page’s address, so a link opens the same view, and they stay chosen when you move to another page of the federation. “Clear
          filters” shows everything again.
        </p>
      </section>

      <section id="agreement" aria-labelledby="help-agreement" className="card space-y-2">
        <h2 id="help-agreement">Agreement figures</h2>
        <ul className="list-disc space-y-1 pl-5">
          <li>
            <strong>Same class</strong> and <strong>within half a class</strong>: the share of panels (or ratings) where classifiers gave
            the same class, or classes at most one half-point step apart.
          </li>
          <li>
            <strong>Kappa and alpha</strong> correct agreement for what chance alone would give; 1 is perfect agreement, 0 is no better than
            chance. The bands (Landis and Koch, 1977; Krippendorff, 2004) are rules of thumb, not verdicts.
          </li>
          <li>
            <strong>Bias</strong> is a classifier’s mean difference from the other members of their panels, in sport-class points (+ means
            they rate higher; 0.5 points is one class step).
          </li>
          <li>
            Every figure comes with the number of assessments behind it and, where one can be computed, a 95 % interval: small numbers give
            wide intervals.
          </li>
        </ul>
      </section>

      {role === 'lead' ? (
        <section id="flags" aria-labelledby="help-flags" className="card space-y-3">
          <h2 id="help-flags">Calibration flags</h2>
          <p>
            A flag is a prompt to look at a classifier’s recent ratings and talk with them, not a finding. Three rules are checked for every
            classifier:
          </p>
          <div className="overflow-x-auto">
            <table className="w-full border-collapse text-sm">
              <caption className="sr-only">Rules of the calibration flags and their defaults</caption>
              <thead className="bg-paper">
                <tr>
                  <th scope="col" className="border-b border-line px-3 py-2 text-left">
                    Rule
                  </th>
                  <th scope="col" className="border-b border-line px-3 py-2 text-left">
                    Raised when
                  </th>
                  <th scope="col" className="border-b border-line px-3 py-2 text-left">
                    Default
                  </th>
                </tr>
              </thead>
              <tbody>
                <tr className="border-b border-line">
                  <th scope="row" className="px-3 py-2 text-left font-semibold">
                    Kappa
                  </th>
                  <td className="px-3 py-2">
                    The quadratically weighted kappa with the panel over the classifier’s most recent ratings is below the lowest kappa.
                  </td>
                  <td className="px-3 py-2">0.80 over the last 100 ratings</td>
                </tr>
                <tr className="border-b border-line">
                  <th scope="row" className="px-3 py-2 text-left font-semibold">
                    Bias
                  </th>
                  <td className="px-3 py-2">
                    The mean deviation from the other panel members, up or down, over the most recent ratings reaches the largest bias.
                  </td>
                  <td className="px-3 py-2">0.25 points (half a class step) over the last 30 ratings</td>
                </tr>
                <tr>
                  <th scope="row" className="px-3 py-2 text-left font-semibold">
                    Drift
                  </th>
                  <td className="px-3 py-2">
                    The change detector (a two-sided CUSUM of standardised deviations from the panel) signalled within the classifier’s most
                    recent ratings.
                  </td>
                  <td className="px-3 py-2">k = 0.5 σ, h = 5 σ, within the last 100 ratings; on</td>
                </tr>
              </tbody>
            </table>
          </div>
          <p>
            Kappa and bias flags need at least 20 ratings in their window, so a newcomer is not flagged on a handful of panels. The
            thresholds are the lead’s to set on the flags page, within the federation’s own rules.
          </p>
          <p>
            A flag is <strong>open</strong> until you acknowledge it, and stays until you <strong>close</strong> it with a note of what was
            done. When its condition no longer holds it says “no longer met” but is not closed for you. A closed flag is not raised again on
            the same ratings. Flags are evaluated after every import, when the thresholds are saved, and when you press “Evaluate now”; with
            e-mail on, the federation’s leads get one message when new flags open.
          </p>
          <p>
            <Link to="../flags" relative="path" className="font-semibold text-harbour underline">
              Back to the calibration flags
            </Link>
          </p>
        </section>
      ) : null}
    </article>
  );
}
