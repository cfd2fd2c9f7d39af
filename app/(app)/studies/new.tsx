import { laterScreen } from '../../../components/later-screens';

/** A new study: the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('newStudy');
