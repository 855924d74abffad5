import { PageHeader } from "../components/ui/layout";
import { CreateStudyDialog } from "../features/studies/create-study-dialog";
import { StudiesList } from "../features/studies/studies-list";

export function StudiesPage() {
  return (
    <>
      <title>Studies · Stagewright</title>
      <PageHeader title="Studies" subtitle="Each Study holds the work on one population." actions={<CreateStudyDialog />} />
      <StudiesList />
    </>
  );
}
