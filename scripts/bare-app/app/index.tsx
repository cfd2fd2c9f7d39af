import { useEffect, useState } from 'react';
import { ScrollView, StyleSheet, Text, View } from 'react-native';

interface Row {
  id: string;
  title: string;
  detail: string;
}

/** A list of rows fetched from the server as JSON, the baseline the worklist's first load is held to. */
export default function Index() {
  const [rows, setRows] = useState<Row[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    fetch('/api/rows', { headers: { Accept: 'application/json' } })
      .then((r) => (r.ok ? r.json() : Promise.reject(new Error(`HTTP ${r.status}`))))
      .then((body: { items: Row[] }) => setRows(body.items))
      .catch((e: Error) => setError(e.message));
  }, []);
  return (
    <ScrollView contentContainerStyle={styles.page}>
      <Text style={styles.title}>List</Text>
      {error ? <Text>{error}</Text> : null}
      {rows === null && !error ? <Text>Loading…</Text> : null}
      {rows?.map((row) => (
        <View key={row.id} testID={`row-${row.id}`} style={styles.row}>
          <Text style={styles.rowTitle}>{row.title}</Text>
          <Text style={styles.rowDetail}>{row.detail}</Text>
        </View>
      ))}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  page: { padding: 16, gap: 8 },
  title: { fontSize: 24, fontWeight: '700' },
  row: { padding: 12, borderBottomWidth: 1, borderBottomColor: '#ddd', gap: 4 },
  rowTitle: { fontSize: 16, fontWeight: '600' },
  rowDetail: { fontSize: 13, color: '#555' },
});
