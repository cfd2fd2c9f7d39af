import { laterScreen } from '../../../components/later-screens';

/** The coding queue: the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('codingQueue');
