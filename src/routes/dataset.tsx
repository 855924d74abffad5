import { useSuspenseQuery } from "@tanstack/react-query";
import { useParams } from "react-router";
import { roleAtLeast } from "../../shared/schemas";
import { datasetFileUrl, datasetQueryOptions } from "../api/field-data";
import { useStudy } from "../api/studies";
import { PageHeader } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { RelativeTime } from "../components/ui/time";
import { CountsView, FatesView, KIND_LABEL } from "../features/field-data";
import { paths } from "./paths";

/** One Field-data dataset with the analysis of its kind. */
export function DatasetPage() {
  const { datasetId = "" } = useParams();
  const dataset = useSuspenseQuery(datasetQueryOptions(datasetId)).data;
  const study = useStudy(dataset.studyId);
  const canEdit = roleAtLeast(study.role, "editor");
  return (
    <>
      <title>{`${dataset.name} · Field data · Stagewright`}</title>
      <PageHeader
        eyebrow={
          <>
            <TextLink to={paths.study(study.id)}>{study.name}</TextLink> › <TextLink to={paths.fieldData(study.id)}>Field data</TextLink>
          </>
        }
        title={dataset.name}
        subtitle={
          <span className="text-sm">
            {KIND_LABEL[dataset.kind]} · {dataset.rowCount.toLocaleString("en")} rows
            {dataset.sites.length > 0 && ` · ${dataset.sites.join(", ")}`}
            {dataset.stages.length > 0 && ` · stages ${dataset.stages.join(", ")}`} · uploaded <RelativeTime iso={dataset.uploadedAt} />
            {dataset.uploadedBy && ` by ${dataset.uploadedBy}`} ·{" "}
            <a className="text-indigo underline" href={datasetFileUrl(dataset.id)} download>
              download {dataset.fileName}
            </a>
          </span>
        }
      />
      {dataset.kind === "counts" ? <CountsView dataset={dataset} /> : <FatesView dataset={dataset} canEdit={canEdit} />}
    </>
  );
}
