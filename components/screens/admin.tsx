import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../ui/layout';
import { PageHeader } from '../page-header';
import { space } from '../theme';
import { UsersSection } from '../admin/users-section';
import { ThresholdsSection } from '../admin/thresholds-section';
import { LabSettingsSection } from '../admin/lab-settings-section';
import { TemplatesSection } from '../admin/templates-section';

/** The admin's page: users and the role mapping, thresholds with effective dates, lab settings, report templates. Every change is audited. */
export default function AdminPage() {
  return (
    <Content>
      <Center style={styles.column}>
        <PageHeader title="Administration" subtitle="Users and roles, the thresholds that judge each study, the lab's settings and report templates. Every change is recorded in the audit trail with its before and after." />
        <UsersSection />
        <ThresholdsSection />
        <LabSettingsSection />
        <TemplatesSection />
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  column: { gap: space.xl },
});
