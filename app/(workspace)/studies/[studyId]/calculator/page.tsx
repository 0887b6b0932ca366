import type { Metadata } from "next";
import Link from "next/link";
import { PowerCalculator } from "@/components/power-calculator";
import { getStudy } from "@/db/queries/studies";
import { requireUser } from "@/lib/server/current-user";
import { loadOr404 } from "@/lib/server/page";

export const metadata: Metadata = { title: "Power calculator" };

export default async function CalculatorPage({ params }: { params: Promise<{ studyId: string }> }) {
  const user = await requireUser();
  const { studyId } = await params;
  const study = await loadOr404(() => getStudy(user, Number(studyId)));
  return (
    <div className="flex flex-col gap-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/studies">Studies</Link> <span aria-hidden="true">›</span> <Link href={`/studies/${study.id}`}>{study.code}</Link>{" "}
        <span aria-hidden="true">›</span> Power calculator
      </nav>
      <div>
        <h1>Power calculator</h1>
        <p className="text-ink-soft">
          What-if questions for {study.code}: choose what you want to find, fill in what you know, and the answer follows as you type. Nothing here is saved.
        </p>
      </div>
      <PowerCalculator />
    </div>
  );
}
