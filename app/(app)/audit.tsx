import { laterScreen } from '../../components/later-screens';

export default laterScreen('audit');
