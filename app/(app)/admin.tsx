import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../../components/ui/layout';
import { PageHeader } from '../../components/page-header';
import { space } from '../../components/theme';
import { UsersSection } from '../../components/admin/users-section';
import { ThresholdsSection } from '../../components/admin/thresholds-section';
import { LabSettingsSection } from '../../components/admin/lab-settings-section';
import { TemplatesSection } from '../../components/admin/templates-section';

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
